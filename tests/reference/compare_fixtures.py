#!/usr/bin/env python3
"""Checks that the committed reference fixtures are current after `npm run fixtures` re-ran.

Every file under tests/reference/fixtures is compared with its committed version (git HEAD):
JSON files value by value, numbers within a relative 1e-8 (absolute 1e-12 near zero), every other
file byte for byte. Why a tolerance: scipy.signal.group_delay's values near DC differ in their last
digits between processors (BLAS kernels), about 1e-10 relative here, far inside the 1e-3 relative
error the tests already allow it (docs/references.md, "Group delay"). Anything else that changes
(a call, a list's length, a value beyond the tolerance, a new or missing file) is reported, and the
exit code is 1.
"""
import json
import math
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
FIXTURES = Path('tests/reference/fixtures')
REL, ABS = 1e-8, 1e-12


def committed(path: str) -> bytes | None:
    r = subprocess.run(['git', 'show', f'HEAD:{path}'], cwd=ROOT, capture_output=True)
    return r.stdout if r.returncode == 0 else None


def same(a, b, where: str, problems: list[str]) -> None:
    if isinstance(a, bool) or isinstance(b, bool) or not (isinstance(a, (int, float)) and isinstance(b, (int, float))):
        if type(a) is not type(b):
            problems.append(f'{where}: {type(a).__name__} became {type(b).__name__}')
        elif isinstance(a, dict):
            if a.keys() != b.keys():
                problems.append(f'{where}: keys {sorted(a.keys() ^ b.keys())} differ')
            for k in a.keys() & b.keys():
                same(a[k], b[k], f'{where}.{k}', problems)
        elif isinstance(a, list):
            if len(a) != len(b):
                problems.append(f'{where}: length {len(a)} became {len(b)}')
            for i, (x, y) in enumerate(zip(a, b)):
                same(x, y, f'{where}[{i}]', problems)
        elif a != b:
            problems.append(f'{where}: {a!r} became {b!r}')
        return
    if not math.isclose(a, b, rel_tol=REL, abs_tol=ABS):
        problems.append(f'{where}: {a!r} became {b!r}')


def main() -> int:
    problems: list[str] = []
    tracked = subprocess.run(['git', 'ls-files', str(FIXTURES)], cwd=ROOT, capture_output=True, text=True).stdout.split()
    present = sorted(str(p.relative_to(ROOT)) for p in (ROOT / FIXTURES).rglob('*') if p.is_file())
    for path in sorted(set(tracked) | set(present)):
        old = committed(path)
        new_path = ROOT / path
        if old is None:
            problems.append(f'{path}: new file, not committed')
            continue
        if not new_path.exists():
            problems.append(f'{path}: no longer written')
            continue
        new = new_path.read_bytes()
        if path.endswith('.json'):
            same(json.loads(old), json.loads(new), path, problems)
        elif old != new:
            problems.append(f'{path}: bytes differ')
    for p in problems[:40]:
        print(p)
    if problems:
        print(f'{len(problems)} difference(s): run npm run fixtures and commit')
        return 1
    print(f'{len(present)} fixture files current (JSON numbers within {REL:g} relative)')
    return 0


if __name__ == '__main__':
    sys.exit(main())
