;; Sub-lattice interpolation of two rows (β⊥, β∥) at once, for lib/bow/simd-sub-lattice.ts: the operations of
;; interpolateSubLattice (lib/bow/mie-sub-lattice.ts) lane by lane, f64x2 lane 0 the first row and lane 1 the second,
;; each lane in IEEE-754 double with separate multiply and add (WebAssembly core spec 2.0 §4.3.3) and the taps summed
;; in the same order, so the values equal the TypeScript loop's to the last bit. Four outputs of one residue (lattice
;; indices i, i + c, i + 2c, i + 3c: the same weights, nodes one apart) run as four independent sums.
;;
;; Memory (byte addresses), laid out by lib/bow/simd-sub-lattice.ts:
;;   weights   c rows of `points` f64 (row 0 unused: the nodes themselves)
;;   coarse    the nodes qLo.. interleaved: first row's value, second row's value, node by node
;;   outA      outputs for lattice indices hi, hi − 1, …, lo of the first row (f64)
;;   outB      the same for the second row
(module
  (memory (export "memory") 1)

  (func (export "interpolate") (param $weights i32) (param $coarse i32) (param $points i32) (param $c i32)
    (param $lo i32) (param $hi i32) (param $qLo i32) (param $outA i32) (param $outB i32)
    (local $r i32) (local $i i32) (local $q i32) (local $j i32) (local $k i32) (local $wr i32) (local $at i32)
    (local $step3 i32) (local $zero v128) (local $w v128) (local $v v128)
    (local $a0 v128) (local $a1 v128) (local $a2 v128) (local $a3 v128)
    (local.set $zero (f64x2.splat (f64.const 0)))
    (local.set $step3 (i32.mul (local.get $c) (i32.const 3)))
    (block $residuesDone
      (loop $residue
        (br_if $residuesDone (i32.ge_s (local.get $r) (local.get $c)))
        ;; first lattice index ≥ lo with index ≡ r (mod c)
        (local.set $i (i32.add (local.get $lo)
          (i32.rem_s (i32.add (i32.rem_s (i32.sub (local.get $r) (local.get $lo)) (local.get $c)) (local.get $c)) (local.get $c))))
        (local.set $wr (i32.add (local.get $weights) (i32.shl (i32.mul (local.get $r) (local.get $points)) (i32.const 3))))
        (if (i32.eqz (local.get $r))
          (then
            ;; the nodes themselves: copied
            (block $copyDone
              (loop $copy
                (br_if $copyDone (i32.gt_s (local.get $i) (local.get $hi)))
                (local.set $q (i32.div_s (i32.sub (local.get $i) (local.get $r)) (local.get $c)))
                (local.set $j (i32.shl (i32.sub (local.get $hi) (local.get $i)) (i32.const 3)))
                (local.set $v (v128.load align=8 (i32.add (local.get $coarse)
                  (i32.shl (i32.sub (local.get $q) (local.get $qLo)) (i32.const 4)))))
                (f64.store (i32.add (local.get $outA) (local.get $j)) (f64x2.extract_lane 0 (local.get $v)))
                (f64.store (i32.add (local.get $outB) (local.get $j)) (f64x2.extract_lane 1 (local.get $v)))
                (local.set $i (i32.add (local.get $i) (local.get $c)))
                (br $copy))))
          (else
            ;; four outputs at a time while i + 3c ≤ hi
            (block $fourDone
              (loop $four
                (br_if $fourDone (i32.gt_s (i32.add (local.get $i) (local.get $step3)) (local.get $hi)))
                (local.set $q (i32.div_s (i32.sub (local.get $i) (local.get $r)) (local.get $c)))
                ;; byte address of node q − (points/2 − 1), the first tap
                (local.set $at (i32.add (local.get $coarse) (i32.shl
                  (i32.sub (i32.add (i32.sub (local.get $q) (i32.shr_s (local.get $points) (i32.const 1))) (i32.const 1)) (local.get $qLo))
                  (i32.const 4))))
                (local.set $a0 (local.get $zero))
                (local.set $a1 (local.get $zero))
                (local.set $a2 (local.get $zero))
                (local.set $a3 (local.get $zero))
                (local.set $k (i32.const 0))
                (loop $tap
                  (local.set $w (v128.load64_splat align=8 (i32.add (local.get $wr) (i32.shl (local.get $k) (i32.const 3)))))
                  (local.set $a0 (f64x2.add (local.get $a0) (f64x2.mul (local.get $w) (v128.load align=8 (local.get $at)))))
                  (local.set $a1 (f64x2.add (local.get $a1) (f64x2.mul (local.get $w) (v128.load offset=16 align=8 (local.get $at)))))
                  (local.set $a2 (f64x2.add (local.get $a2) (f64x2.mul (local.get $w) (v128.load offset=32 align=8 (local.get $at)))))
                  (local.set $a3 (f64x2.add (local.get $a3) (f64x2.mul (local.get $w) (v128.load offset=48 align=8 (local.get $at)))))
                  (local.set $at (i32.add (local.get $at) (i32.const 16)))
                  (local.set $k (i32.add (local.get $k) (i32.const 1)))
                  (br_if $tap (i32.lt_s (local.get $k) (local.get $points))))
                ;; |S|² is never negative: max(0, v) as `v > 0 ? v : 0` (pmax(0, v) is v only where 0 < v; NaN, −0 give 0)
                ;; for u in 0..3
                (local.set $a{u} (f64x2.pmax (local.get $zero) (local.get $a{u})))
                (local.set $j (i32.shl (i32.sub (local.get $hi) (i32.add (local.get $i) (i32.mul (local.get $c) (i32.const {u})))) (i32.const 3)))
                (f64.store (i32.add (local.get $outA) (local.get $j)) (f64x2.extract_lane 0 (local.get $a{u})))
                (f64.store (i32.add (local.get $outB) (local.get $j)) (f64x2.extract_lane 1 (local.get $a{u})))
                ;; end for
                (local.set $i (i32.add (local.get $i) (i32.shl (local.get $c) (i32.const 2))))
                (br $four)))
            ;; the rest one at a time
            (block $oneDone
              (loop $one
                (br_if $oneDone (i32.gt_s (local.get $i) (local.get $hi)))
                (local.set $q (i32.div_s (i32.sub (local.get $i) (local.get $r)) (local.get $c)))
                (local.set $at (i32.add (local.get $coarse) (i32.shl
                  (i32.sub (i32.add (i32.sub (local.get $q) (i32.shr_s (local.get $points) (i32.const 1))) (i32.const 1)) (local.get $qLo))
                  (i32.const 4))))
                (local.set $a0 (local.get $zero))
                (local.set $k (i32.const 0))
                (loop $tap1
                  (local.set $w (v128.load64_splat align=8 (i32.add (local.get $wr) (i32.shl (local.get $k) (i32.const 3)))))
                  (local.set $a0 (f64x2.add (local.get $a0) (f64x2.mul (local.get $w) (v128.load align=8 (local.get $at)))))
                  (local.set $at (i32.add (local.get $at) (i32.const 16)))
                  (local.set $k (i32.add (local.get $k) (i32.const 1)))
                  (br_if $tap1 (i32.lt_s (local.get $k) (local.get $points))))
                (local.set $a0 (f64x2.pmax (local.get $zero) (local.get $a0)))
                (local.set $j (i32.shl (i32.sub (local.get $hi) (local.get $i)) (i32.const 3)))
                (f64.store (i32.add (local.get $outA) (local.get $j)) (f64x2.extract_lane 0 (local.get $a0)))
                (f64.store (i32.add (local.get $outB) (local.get $j)) (f64x2.extract_lane 1 (local.get $a0)))
                (local.set $i (i32.add (local.get $i) (local.get $c)))
                (br $one)))))
        (local.set $r (i32.add (local.get $r) (i32.const 1)))
        (br $residue)))
  )
)
