;; a_n, b_n from ψ_n, χ_n and D_n(mx), two orders per f64x2 vector, for lib/mie/simd-coefficients.ts: the
;; operations of lib/mie/coefficients.ts (mieCoefficients and its setRatio) in the same order, each lane in IEEE-754
;; double (WebAssembly core spec 2.0 §4.3.3), so the coefficients equal the TypeScript loop's to the last bit.
;; a_n = [(D_n/m + n/x)ψ_n − ψ_{n−1}] / [(D_n/m + n/x)ξ_n − ξ_{n−1}], b_n likewise with m·D_n
;; (Bohren & Huffman 1983 eq. 4.88), ξ_n = ψ_n − iχ_n.
;;
;; Memory (byte addresses), laid out by lib/mie/simd-coefficients.ts; each input holds orders 0..nTerms + 1 (the
;; last lane of an odd count reads one order past nTerms; its result lands past nTerms and is not used):
;;   psi, chi, dRe, dIm   ψ_n, χ_n, Re D_n, Im D_n for n = 0, 1, …
;;   out                  a re, a im, b re, b im: four arrays of nTerms rounded up to even, order n at index n − 1
(module
  (memory (export "memory") 1)

  (func (export "ratios") (param $psi i32) (param $chi i32) (param $dRe i32) (param $dIm i32) (param $nTerms i32)
    (param $x f64) (param $mReIn f64) (param $mImIn f64) (param $imReIn f64) (param $imImIn f64) (param $out i32)
    (local $i i32) (local $end i32) (local $stride i32) (local $at i32) (local $k v128) (local $two v128) (local $xv v128)
    (local $mRe v128) (local $mIm v128) (local $imRe v128) (local $imIm v128)
    (local $nx v128) (local $ps v128) (local $ps1 v128) (local $xiIm v128) (local $xi1Im v128) (local $dr v128) (local $di v128)
    (local $fRe0 v128) (local $fIm0 v128) (local $fRe1 v128) (local $fIm1 v128) (local $fps v128)
    (local $numRe v128) (local $numIm v128) (local $denRe v128) (local $denIm v128) (local $d2 v128)
    (local.set $k (f64x2.replace_lane 1 (f64x2.splat (f64.const 1)) (f64.const 2)))
    (local.set $two (f64x2.splat (f64.const 2)))
    (local.set $xv (f64x2.splat (local.get $x)))
    (local.set $mRe (f64x2.splat (local.get $mReIn)))
    (local.set $mIm (f64x2.splat (local.get $mImIn)))
    (local.set $imRe (f64x2.splat (local.get $imReIn)))
    (local.set $imIm (f64x2.splat (local.get $imImIn)))
    ;; Bytes between the four output arrays: nTerms rounded up to even, 8 bytes each.
    (local.set $stride (i32.shl (i32.and (i32.add (local.get $nTerms) (i32.const 1)) (i32.const -2)) (i32.const 3)))
    (local.set $end (i32.shl (local.get $nTerms) (i32.const 3)))
    (block $done
      (loop $pair
        (br_if $done (i32.ge_u (local.get $i) (local.get $end)))
        ;; Lanes: orders n = i/8 + 1 and i/8 + 2 (i a byte offset from order 1).
        (local.set $nx (f64x2.div (local.get $k) (local.get $xv)))
        (local.set $ps (v128.load offset=8 align=8 (i32.add (local.get $psi) (local.get $i))))
        (local.set $ps1 (v128.load align=8 (i32.add (local.get $psi) (local.get $i))))
        (local.set $xiIm (f64x2.neg (v128.load offset=8 align=8 (i32.add (local.get $chi) (local.get $i)))))
        (local.set $xi1Im (f64x2.neg (v128.load align=8 (i32.add (local.get $chi) (local.get $i)))))
        (local.set $dr (v128.load offset=8 align=8 (i32.add (local.get $dRe) (local.get $i))))
        (local.set $di (v128.load offset=8 align=8 (i32.add (local.get $dIm) (local.get $i))))
        ;; f = D/m + n/x for a_n (c = 0), m·D + n/x for b_n (c = 1)
        (local.set $fRe0 (f64x2.add (f64x2.sub (f64x2.mul (local.get $dr) (local.get $imRe))
          (f64x2.mul (local.get $di) (local.get $imIm))) (local.get $nx)))
        (local.set $fIm0 (f64x2.add (f64x2.mul (local.get $dr) (local.get $imIm)) (f64x2.mul (local.get $di) (local.get $imRe))))
        (local.set $fRe1 (f64x2.add (f64x2.sub (f64x2.mul (local.get $dr) (local.get $mRe))
          (f64x2.mul (local.get $di) (local.get $mIm))) (local.get $nx)))
        (local.set $fIm1 (f64x2.add (f64x2.mul (local.get $dr) (local.get $mIm)) (f64x2.mul (local.get $di) (local.get $mRe))))
        ;; (f·ψ_n − ψ_{n−1}) / (f·ξ_n − ξ_{n−1}) with ξ_n re = ψ_n: re into array 2c, im into array 2c + 1
        ;; for c in 0..1
        (local.set $fps (f64x2.mul (local.get $fRe{c}) (local.get $ps)))
        (local.set $numRe (f64x2.sub (local.get $fps) (local.get $ps1)))
        (local.set $numIm (f64x2.mul (local.get $fIm{c}) (local.get $ps)))
        (local.set $denRe (f64x2.sub (f64x2.sub (local.get $fps) (f64x2.mul (local.get $fIm{c}) (local.get $xiIm))) (local.get $ps1)))
        (local.set $denIm (f64x2.sub (f64x2.add (f64x2.mul (local.get $fRe{c}) (local.get $xiIm)) (local.get $numIm)) (local.get $xi1Im)))
        (local.set $d2 (f64x2.add (f64x2.mul (local.get $denRe) (local.get $denRe)) (f64x2.mul (local.get $denIm) (local.get $denIm))))
        (local.set $at (i32.add (i32.add (local.get $out) (local.get $i)) (i32.mul (local.get $stride) (i32.const {2*c}))))
        (v128.store align=8 (local.get $at) (f64x2.div
          (f64x2.add (f64x2.mul (local.get $numRe) (local.get $denRe)) (f64x2.mul (local.get $numIm) (local.get $denIm))) (local.get $d2)))
        (v128.store align=8 (i32.add (local.get $at) (local.get $stride)) (f64x2.div
          (f64x2.sub (f64x2.mul (local.get $numIm) (local.get $denRe)) (f64x2.mul (local.get $numRe) (local.get $denIm))) (local.get $d2)))
        ;; end for
        (local.set $k (f64x2.add (local.get $k) (local.get $two)))
        (local.set $i (i32.add (local.get $i) (i32.const 16)))
        (br $pair))))
)
