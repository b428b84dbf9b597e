;; The response kernel's section loop in WebAssembly with 128-bit SIMD: two frequency points per
;; lane pair (f64x2). It computes exactly what `evaluatePoint` in kernel.ts computes, in the same
;; order, so the two agree bit for bit: per point the dual products (PF, PF') and (PG, PG') of the
;; sections' numerator and denominator factors, taken two factors at a time (see "Pairs of
;; sections" in kernel.ts), then H = PF / PG, tau and the log-magnitude slope with one division per
;; product. Transcendentals (sin, sqrt) stay in JavaScript, once per point of a grid.
;;
;; Each factor is evaluated around z = 1 or z = -1 in the accurate form described in kernel.ts
;; ("Accurate evaluation near z = 1 and z = -1"); the caller passes the points of one side and that
;; side's constant set.
;;
;; The two products are formed one after the other, each in its own loop: one running dual number
;; (4 vectors) and the temporaries of a pair fit in the 16 vector registers, where the two at once
;; would not (V8 then spills running values to the stack on every pass).
;;
;; Memory layout (byte offsets; n8 = 8 x the padded, even point count):
;;   sec + 160 m : pair m: A0 A1 A2 B0 B1 of the numerator pair, then of the denominator pair,
;;                 f64 each twice (one per lane)
;;   pts + k n8  : k = 0 u = 1 - cos t, 1 sin t, 2 cos t, 3 sin^2 t (inputs; read from memory where
;;                 used)
;;   out + k n8  : k = 0 Re H, 1 Im H, 2 log2 scale, 3 tau, 4 slope (outputs); 0 and 1 hold the
;;                 rescale counts of PF and PG during the loop
;; Per pair, F = a + j b and F' = dF/dt = cs + j bp with
;;   w = A2 u, a = A0 + u (A1 + w), cs = sin t (A1 + 2 w), B = B0 + B1 u, b = sin t B,
;;   bp = cos t B + B1 sin^2 t.
;; Rescaling, checked after every 2nd pair (4 sections): when |P|^2 of a product leaves
;; [1e-100, 1e100] (and is neither 0 nor infinite), P and P' are multiplied by 2^-166 or 2^166
;; (exact) and its count moves by +1 or -1. After the last pair the same step runs until the
;; product is inside (at most 8 times). Returns 1 if any point's log2 scale is not 0, else 0.
;;
;; Regenerate the bytes in kernel-wasm-bytes.ts with `npm run build:wasm` after editing.
(module
  (memory (export "memory") 1)
  (func (export "cascade") (param $sec i32) (param $npairs i32) (param $pts i32) (param $n8 i32) (param $out i32) (result i32)
    (local $p i32) (local $o i32) (local $oend i32) (local $k i32) (local $step i32) (local $again i32) (local $chain i32)
    (local $pu i32) (local $ps i32) (local $pc i32) (local $p2 i32) (local $cp i32) (local $cnt i32) (local $scaled v128)
    (local $pr v128) (local $pi v128) (local $qr v128) (local $qi v128)
    (local $gr v128) (local $gi v128) (local $hr v128) (local $hi v128)
    (local $a v128) (local $b v128) (local $c v128) (local $cs v128) (local $bp v128) (local $t v128) (local $w v128)
    (local $m2 v128) (local $mhi v128) (local $mlo v128) (local $f v128) (local $ip v128) (local $ig v128)
    (local.set $scaled (v128.const i64x2 0 0))
    (local.set $p (i32.const 0))
    (block $done
      (loop $points
        (br_if $done (i32.ge_u (local.get $p) (local.get $n8)))
        (local.set $pu (i32.add (local.get $pts) (local.get $p)))
        (local.set $ps (i32.add (local.get $pu) (local.get $n8)))
        (local.set $pc (i32.add (local.get $ps) (local.get $n8)))
        (local.set $p2 (i32.add (local.get $pc) (local.get $n8)))
        (local.set $cp (i32.add (local.get $out) (local.get $p)))
        ;; chain 0: the numerator pairs (constants at +0), count at cp; chain 1: the denominator
        ;; pairs (+80), count at cp + n8. The first chain's dual number is kept in gr gi hr hi.
        (local.set $chain (i32.const 0))
        (loop $chains
          (local.set $cnt (i32.add (local.get $cp) (i32.mul (local.get $chain) (local.get $n8))))
          (v128.store (local.get $cnt) (v128.const f64x2 0 0))
          (local.set $pr (v128.const f64x2 1 1))
          (local.set $pi (v128.const f64x2 0 0))
          (local.set $qr (v128.const f64x2 0 0))
          (local.set $qi (v128.const f64x2 0 0))
          (local.set $o (i32.add (local.get $sec) (i32.mul (local.get $chain) (i32.const 80))))
          (local.set $oend (i32.add (local.get $o) (i32.mul (local.get $npairs) (i32.const 160))))
          (local.set $k (i32.const 0))
          (block $sdone
            (loop $pairs
              (br_if $sdone (i32.ge_u (local.get $o) (local.get $oend)))
              (local.set $w (f64x2.mul (v128.load offset=32 (local.get $o)) (v128.load (local.get $pu))))
              (local.set $c (v128.load offset=16 (local.get $o)))
              (local.set $a (f64x2.add (v128.load offset=0 (local.get $o))
                (f64x2.mul (v128.load (local.get $pu)) (f64x2.add (local.get $c) (local.get $w)))))
              (local.set $cs (f64x2.mul (v128.load (local.get $ps)) (f64x2.add (local.get $c) (f64x2.add (local.get $w) (local.get $w)))))
              (local.set $c (v128.load offset=64 (local.get $o)))
              (local.set $w (f64x2.add (v128.load offset=48 (local.get $o)) (f64x2.mul (local.get $c) (v128.load (local.get $pu)))))
              (local.set $b (f64x2.mul (v128.load (local.get $ps)) (local.get $w)))
              (local.set $bp (f64x2.add (f64x2.mul (v128.load (local.get $pc)) (local.get $w)) (f64x2.mul (local.get $c) (v128.load (local.get $p2)))))
              ;; (P, P') <- (P F, P' F + P F')
              (local.set $t (f64x2.add
                (f64x2.sub (f64x2.mul (local.get $qr) (local.get $a)) (f64x2.mul (local.get $qi) (local.get $b)))
                (f64x2.sub (f64x2.mul (local.get $pr) (local.get $cs)) (f64x2.mul (local.get $pi) (local.get $bp)))))
              (local.set $qi (f64x2.add
                (f64x2.add (f64x2.mul (local.get $qr) (local.get $b)) (f64x2.mul (local.get $qi) (local.get $a)))
                (f64x2.add (f64x2.mul (local.get $pr) (local.get $bp)) (f64x2.mul (local.get $pi) (local.get $cs)))))
              (local.set $qr (local.get $t))
              (local.set $t (f64x2.sub (f64x2.mul (local.get $pr) (local.get $a)) (f64x2.mul (local.get $pi) (local.get $b))))
              (local.set $pi (f64x2.add (f64x2.mul (local.get $pr) (local.get $b)) (f64x2.mul (local.get $pi) (local.get $a))))
              (local.set $pr (local.get $t))
              (local.set $o (i32.add (local.get $o) (i32.const 160)))
              (local.set $k (i32.add (local.get $k) (i32.const 1)))
              (if (i32.eqz (i32.and (local.get $k) (i32.const 1)))
                (then
                  (local.set $m2 (f64x2.add (f64x2.mul (local.get $pr) (local.get $pr)) (f64x2.mul (local.get $pi) (local.get $pi))))
                  (local.set $mhi (v128.and
                    (f64x2.gt (local.get $m2) (v128.const f64x2 1e100 1e100))
                    (f64x2.lt (local.get $m2) (v128.const f64x2 inf inf))))
                  (local.set $mlo (v128.and
                    (f64x2.lt (local.get $m2) (v128.const f64x2 1e-100 1e-100))
                    (f64x2.gt (local.get $m2) (v128.const f64x2 0 0))))
                  (if (v128.any_true (v128.or (local.get $mhi) (local.get $mlo)))
                    (then
                      (local.set $f (v128.bitselect (v128.const f64x2 0x1p166 0x1p166)
                        (v128.bitselect (v128.const f64x2 0x1p-166 0x1p-166) (v128.const f64x2 1 1) (local.get $mhi))
                        (local.get $mlo)))
                      (local.set $pr (f64x2.mul (local.get $pr) (local.get $f)))
                      (local.set $pi (f64x2.mul (local.get $pi) (local.get $f)))
                      (local.set $qr (f64x2.mul (local.get $qr) (local.get $f)))
                      (local.set $qi (f64x2.mul (local.get $qi) (local.get $f)))
                      (v128.store (local.get $cnt) (f64x2.add (v128.load (local.get $cnt))
                        (f64x2.sub
                          (v128.and (local.get $mhi) (v128.const f64x2 1 1))
                          (v128.and (local.get $mlo) (v128.const f64x2 1 1)))))))))
              (br $pairs)))
          ;; The product inside the window before dividing.
          (local.set $step (i32.const 0))
          (block $fdone
            (loop $final
              (br_if $fdone (i32.ge_u (local.get $step) (i32.const 8)))
              (local.set $m2 (f64x2.add (f64x2.mul (local.get $pr) (local.get $pr)) (f64x2.mul (local.get $pi) (local.get $pi))))
              (local.set $mhi (v128.and
                (f64x2.gt (local.get $m2) (v128.const f64x2 1e100 1e100))
                (f64x2.lt (local.get $m2) (v128.const f64x2 inf inf))))
              (local.set $mlo (v128.and
                (f64x2.lt (local.get $m2) (v128.const f64x2 1e-100 1e-100))
                (f64x2.gt (local.get $m2) (v128.const f64x2 0 0))))
              (br_if $fdone (i32.eqz (v128.any_true (v128.or (local.get $mhi) (local.get $mlo)))))
              (local.set $f (v128.bitselect (v128.const f64x2 0x1p166 0x1p166)
                (v128.bitselect (v128.const f64x2 0x1p-166 0x1p-166) (v128.const f64x2 1 1) (local.get $mhi))
                (local.get $mlo)))
              (local.set $pr (f64x2.mul (local.get $pr) (local.get $f)))
              (local.set $pi (f64x2.mul (local.get $pi) (local.get $f)))
              (local.set $qr (f64x2.mul (local.get $qr) (local.get $f)))
              (local.set $qi (f64x2.mul (local.get $qi) (local.get $f)))
              (v128.store (local.get $cnt) (f64x2.add (v128.load (local.get $cnt))
                (f64x2.sub
                  (v128.and (local.get $mhi) (v128.const f64x2 1 1))
                  (v128.and (local.get $mlo) (v128.const f64x2 1 1)))))
              (local.set $step (i32.add (local.get $step) (i32.const 1)))
              (br $final)))
          (if (i32.eqz (local.get $chain))
            (then
              (local.set $gr (local.get $pr))
              (local.set $gi (local.get $pi))
              (local.set $hr (local.get $qr))
              (local.set $hi (local.get $qi))
              (local.set $chain (i32.const 1))
              (br $chains))))
        ;; Here (gr gi hr hi) = (PF, PF') and (pr pi qr qi) = (PG, PG').
        (local.set $ip (f64x2.div (v128.const f64x2 1 1)
          (f64x2.add (f64x2.mul (local.get $gr) (local.get $gr)) (f64x2.mul (local.get $gi) (local.get $gi)))))
        (local.set $ig (f64x2.div (v128.const f64x2 1 1)
          (f64x2.add (f64x2.mul (local.get $pr) (local.get $pr)) (f64x2.mul (local.get $pi) (local.get $pi)))))
        ;; log2 scale = 166 (count PF - count PG)
        (local.set $t (f64x2.mul (v128.const f64x2 166 166)
          (f64x2.sub (v128.load (local.get $cp)) (v128.load (i32.add (local.get $cp) (local.get $n8))))))
        (local.set $scaled (v128.or (local.get $scaled) (f64x2.ne (local.get $t) (v128.const f64x2 0 0))))
        (v128.store (i32.add (local.get $cp) (i32.shl (local.get $n8) (i32.const 1))) (local.get $t))
        ;; slope = Re(PF' conj PF) / |PF|^2 - Re(PG' conj PG) / |PG|^2; tau = -(Im of the same)
        (v128.store (i32.add (local.get $cp) (i32.shl (local.get $n8) (i32.const 2)))
          (f64x2.sub
            (f64x2.mul (f64x2.add (f64x2.mul (local.get $hr) (local.get $gr)) (f64x2.mul (local.get $hi) (local.get $gi))) (local.get $ip))
            (f64x2.mul (f64x2.add (f64x2.mul (local.get $qr) (local.get $pr)) (f64x2.mul (local.get $qi) (local.get $pi))) (local.get $ig))))
        (v128.store (i32.add (local.get $cp) (i32.mul (local.get $n8) (i32.const 3)))
          (f64x2.sub
            (f64x2.mul (f64x2.sub (f64x2.mul (local.get $hr) (local.get $gi)) (f64x2.mul (local.get $hi) (local.get $gr))) (local.get $ip))
            (f64x2.mul (f64x2.sub (f64x2.mul (local.get $qr) (local.get $pi)) (f64x2.mul (local.get $qi) (local.get $pr))) (local.get $ig))))
        ;; H = PF conj(PG) / |PG|^2
        (v128.store (local.get $cp)
          (f64x2.mul (f64x2.add (f64x2.mul (local.get $gr) (local.get $pr)) (f64x2.mul (local.get $gi) (local.get $pi))) (local.get $ig)))
        (v128.store (i32.add (local.get $cp) (local.get $n8))
          (f64x2.mul (f64x2.sub (f64x2.mul (local.get $gi) (local.get $pr)) (f64x2.mul (local.get $gr) (local.get $pi))) (local.get $ig)))
        (local.set $p (i32.add (local.get $p) (i32.const 16)))
        (br $points)))
    (v128.any_true (local.get $scaled)))
)
