;; The response kernel's section loop in WebAssembly with 128-bit SIMD: two frequency points per
;; lane pair (f64x2). It computes exactly what `cascadeResponseJs` in kernel.ts computes, per
;; point: the running product H = prod N conj(D) / |D|^2, the group delay tau = Re Q and the
;; log-magnitude slope Im Q, Q = sum (N'/N - D'/D) (see kernel.ts). Transcendentals (cos, sin,
;; log, atan2) stay in JavaScript, once per point.
;;
;; Each section is evaluated around z = 1 or z = -1 in the accurate form described in kernel.ts
;; ("Accurate evaluation near z = 1 and z = -1"); the caller passes the points of one side and that
;; side's constant set.
;;
;; Memory layout (byte offsets; n8 = 8 x the padded, even point count):
;;   sec .. sec + 160 nsec : per section B1 B2 N1 P C A1 A2 D1 Q C' as f64, each twice (one per lane)
;;   pts + k n8          : k = 0 sin t, 1 u = 2 sin^2(t/2), 2 v = 2 sin^2 t, 3 sin 2t  (inputs)
;;                          k = 4 Re H, 5 Im H, 6 rescale count, 7 tau, 8 slope (outputs)
;; Rescaling, checked after every 4th section: when |H|^2 leaves [1e-100, 1e100], H is multiplied
;; by 2^-166 or 2^166 (exact) and the count (kept in memory, it changes rarely) moves by +1 or -1:
;; |H|^2 (true) = |H|^2 (stored) x 2^(332 count). Four sections move |H|^2 by less than 1e200
;; unless one of them alone changes the level by more than 125 dB at a point, which leaves the
;; double range (1e-308 .. 1e308) untouched either way.
;;
;; Regenerate the bytes in kernel-wasm-bytes.ts with `npm run build:wasm` after editing.
(module
  (memory (export "memory") 1)
  (func (export "cascade") (param $sec i32) (param $nsec i32) (param $pts i32) (param $n8 i32)
    (local $p i32) (local $end i32) (local $o i32) (local $oend i32) (local $k i32) (local $cp i32)
    (local $s v128) (local $u v128) (local $v v128) (local $s2 v128)
    (local $hr v128) (local $hi v128) (local $tau v128) (local $slope v128)
    (local $b1u v128) (local $b2u v128) (local $b2v v128) (local $pp v128)
    (local $nr v128) (local $nin v128) (local $npr v128) (local $npin v128)
    (local $dr v128) (local $din v128) (local $dpr v128) (local $dpin v128)
    (local $nn v128) (local $dd v128) (local $tn v128) (local $sn v128) (local $td v128) (local $sd v128)
    (local $inv v128) (local $idd v128) (local $tr v128) (local $ti v128) (local $h v128)
    (local $m2 v128) (local $mhi v128) (local $mlo v128) (local $f v128)
    (local.set $p (local.get $pts))
    (local.set $end (i32.add (local.get $pts) (local.get $n8)))
    (local.set $oend (i32.add (local.get $sec) (i32.mul (local.get $nsec) (i32.const 160))))
    (block $done
      (loop $points
        (br_if $done (i32.ge_u (local.get $p) (local.get $end)))
        (local.set $s (v128.load (local.get $p)))
        (local.set $u (v128.load (i32.add (local.get $p) (local.get $n8))))
        (local.set $v (v128.load (i32.add (local.get $p) (i32.mul (local.get $n8) (i32.const 2)))))
        (local.set $s2 (v128.load (i32.add (local.get $p) (i32.mul (local.get $n8) (i32.const 3)))))
        (local.set $cp (i32.add (local.get $p) (i32.mul (local.get $n8) (i32.const 6))))
        (v128.store (local.get $cp) (v128.const f64x2 0 0))
        (local.set $hr (v128.const f64x2 1 1))
        (local.set $hi (v128.const f64x2 0 0))
        (local.set $tau (v128.const f64x2 0 0))
        (local.set $slope (v128.const f64x2 0 0))
        (local.set $o (local.get $sec))
        (local.set $k (i32.const 0))
        (block $sdone
          (loop $sections
            (br_if $sdone (i32.ge_u (local.get $o) (local.get $oend)))
            ;; Numerator: N = nr - j nin, N' = npr - j npin (constants B1 B2 N1 P C at 0..64).
            (local.set $b1u (f64x2.mul (v128.load (local.get $o)) (local.get $u)))
            (local.set $h (v128.load offset=16 (local.get $o)))
            (local.set $b2u (f64x2.mul (local.get $h) (local.get $u)))
            (local.set $b2v (f64x2.mul (local.get $h) (local.get $v)))
            (local.set $pp (v128.load offset=48 (local.get $o)))
            (local.set $nr (f64x2.sub (f64x2.sub (v128.load offset=32 (local.get $o)) (local.get $b1u)) (local.get $b2v)))
            (local.set $nin (f64x2.mul (local.get $s) (f64x2.sub (local.get $pp) (f64x2.add (local.get $b2u) (local.get $b2u)))))
            ;; N' from N: Re = Re N - C - b2 v (C = b0 - b2, or 1 - a2), Im = Im N - b2 sin 2t
            (local.set $npr (f64x2.sub (f64x2.sub (local.get $nr) (v128.load offset=64 (local.get $o))) (local.get $b2v)))
            (local.set $npin (f64x2.add (local.get $nin) (f64x2.mul (local.get $h) (local.get $s2))))
            (local.set $nn (f64x2.add (f64x2.mul (local.get $nr) (local.get $nr)) (f64x2.mul (local.get $nin) (local.get $nin))))
            (local.set $tn (f64x2.add (f64x2.mul (local.get $npr) (local.get $nr)) (f64x2.mul (local.get $npin) (local.get $nin))))
            (local.set $sn (f64x2.sub (f64x2.mul (local.get $npr) (local.get $nin)) (f64x2.mul (local.get $npin) (local.get $nr))))
            ;; Denominator: D = dr - j din, D' = dpr - j dpin (constants A1 A2 D1 Q C' at 80..144).
            (local.set $b1u (f64x2.mul (v128.load offset=80 (local.get $o)) (local.get $u)))
            (local.set $h (v128.load offset=96 (local.get $o)))
            (local.set $b2u (f64x2.mul (local.get $h) (local.get $u)))
            (local.set $b2v (f64x2.mul (local.get $h) (local.get $v)))
            (local.set $pp (v128.load offset=128 (local.get $o)))
            (local.set $dr (f64x2.sub (f64x2.sub (v128.load offset=112 (local.get $o)) (local.get $b1u)) (local.get $b2v)))
            (local.set $din (f64x2.mul (local.get $s) (f64x2.sub (local.get $pp) (f64x2.add (local.get $b2u) (local.get $b2u)))))
            ;; D' from D: Re = Re D - C - b2 v (C = b0 - b2, or 1 - a2), Im = Im D - b2 sin 2t
            (local.set $dpr (f64x2.sub (f64x2.sub (local.get $dr) (v128.load offset=144 (local.get $o))) (local.get $b2v)))
            (local.set $dpin (f64x2.add (local.get $din) (f64x2.mul (local.get $h) (local.get $s2))))
            (local.set $dd (f64x2.add (f64x2.mul (local.get $dr) (local.get $dr)) (f64x2.mul (local.get $din) (local.get $din))))
            (local.set $td (f64x2.add (f64x2.mul (local.get $dpr) (local.get $dr)) (f64x2.mul (local.get $dpin) (local.get $din))))
            (local.set $sd (f64x2.sub (f64x2.mul (local.get $dpr) (local.get $din)) (f64x2.mul (local.get $dpin) (local.get $dr))))
            ;; tau += (Re(N' conj N) |D|^2 - Re(D' conj D) |N|^2) / (|N|^2 |D|^2); slope likewise with Im.
            (local.set $inv (f64x2.div (v128.const f64x2 1 1) (f64x2.mul (local.get $nn) (local.get $dd))))
            (local.set $tau (f64x2.add (local.get $tau)
              (f64x2.mul (local.get $inv) (f64x2.sub (f64x2.mul (local.get $dd) (local.get $tn)) (f64x2.mul (local.get $nn) (local.get $td))))))
            (local.set $slope (f64x2.add (local.get $slope)
              (f64x2.mul (local.get $inv) (f64x2.sub (f64x2.mul (local.get $dd) (local.get $sn)) (f64x2.mul (local.get $nn) (local.get $sd))))))
            ;; T = N conj(D) / |D|^2; H *= T
            (local.set $idd (f64x2.mul (local.get $nn) (local.get $inv)))
            (local.set $tr (f64x2.mul (local.get $idd) (f64x2.add (f64x2.mul (local.get $nr) (local.get $dr)) (f64x2.mul (local.get $nin) (local.get $din)))))
            (local.set $ti (f64x2.mul (local.get $idd) (f64x2.sub (f64x2.mul (local.get $nr) (local.get $din)) (f64x2.mul (local.get $nin) (local.get $dr)))))
            (local.set $h (f64x2.sub (f64x2.mul (local.get $hr) (local.get $tr)) (f64x2.mul (local.get $hi) (local.get $ti))))
            (local.set $hi (f64x2.add (f64x2.mul (local.get $hr) (local.get $ti)) (f64x2.mul (local.get $hi) (local.get $tr))))
            (local.set $hr (local.get $h))
            (local.set $o (i32.add (local.get $o) (i32.const 160)))
            (local.set $k (i32.add (local.get $k) (i32.const 1)))
            (if (i32.eqz (i32.and (local.get $k) (i32.const 3)))
              (then
                (local.set $m2 (f64x2.add (f64x2.mul (local.get $hr) (local.get $hr)) (f64x2.mul (local.get $hi) (local.get $hi))))
                (local.set $mhi (f64x2.gt (local.get $m2) (v128.const f64x2 1e100 1e100)))
                (local.set $mlo (f64x2.lt (local.get $m2) (v128.const f64x2 1e-100 1e-100)))
                (if (v128.any_true (v128.or (local.get $mhi) (local.get $mlo)))
                  (then
                    (local.set $f (v128.bitselect (v128.const f64x2 0x1p-166 0x1p-166) (v128.const f64x2 1 1) (local.get $mhi)))
                    (local.set $f (v128.bitselect (v128.const f64x2 0x1p166 0x1p166) (local.get $f) (local.get $mlo)))
                    (local.set $hr (f64x2.mul (local.get $hr) (local.get $f)))
                    (local.set $hi (f64x2.mul (local.get $hi) (local.get $f)))
                    (v128.store (local.get $cp) (f64x2.add (v128.load (local.get $cp))
                      (f64x2.sub
                        (v128.and (local.get $mhi) (v128.const f64x2 1 1))
                        (v128.and (local.get $mlo) (v128.const f64x2 1 1)))))))))
            (br $sections)))
        (v128.store (i32.add (local.get $p) (i32.mul (local.get $n8) (i32.const 4))) (local.get $hr))
        (v128.store (i32.add (local.get $p) (i32.mul (local.get $n8) (i32.const 5))) (local.get $hi))
        (v128.store (i32.add (local.get $p) (i32.mul (local.get $n8) (i32.const 7))) (local.get $tau))
        (v128.store (i32.add (local.get $p) (i32.mul (local.get $n8) (i32.const 8))) (local.get $slope))
        (local.set $p (i32.add (local.get $p) (i32.const 16)))
        (br $points))))
)
