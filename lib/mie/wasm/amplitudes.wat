;; The angle loop of lib/mie/amplitudes.ts (mieAmplitudesScalar) on f64x2 lanes, two angles per vector, PAIRS vectors
;; per group: per angle the same operations in the same order, so the sums equal the scalar kernel's to the last bit
;; (WebAssembly rounds every product: WebAssembly core spec 2.0 §4.3.3, f64x2.mul).
;; Two phases per chunk of CHUNK orders, so that no loop holds more vectors than x64's 16 registers (a loop doing
;; both held 7 per vector pair and spilled to the stack every order):
;;   fill  π_n ± τ_n of the group's PAIRS vectors into a table: PAIRS independent π recurrences in flight hide
;;         the 4-operation dependency of π_{n+1} on π_n;
;;   sums  Σ w(a+b)(π+τ), Σ w(a−b)(π−τ) from the table, SUM_PAIRS vectors at a time (4 accumulators each).
;; PAIRS = 5, SUM_PAIRS = 1 measured fastest side by side (x = 3,000 and 50,000): 1.05–1.15× 4 and 2, ahead of
;; 4 and 1, 6 and 1; 2 or 8 pairs, or two vectors' sums at a time, were slower (V8 then spilled registers).
;; CHUNK = 128 orders: a 20 KiB table and 6 KiB of coefficients stay in a 32 KiB L1 data cache (lscpu on the
;; benchmark machine) between the phases; 64, 256 and 512 measured slower.
;; Compiled by scripts/compile-wat.mjs (with the `wabt` package) into lib/mie/wasm/modules.generated.ts. Two
;; extensions of the text format are expanded by that script before wabt reads it:
;;   ;; const NAME = value            a constant for the expressions below
;;   ;; for q in A..B … ;; end for    the lines between, once per q, with {expr} replaced by its value
;;   (madd A B C)                     A·B + C: f64x2.mul then f64x2.add in the exact module, f64x2.relaxed_madd
;;                                    (relaxed SIMD proposal, possibly fused) in the fused module
;;
;; const PAIRS = 5
;; const SUM_PAIRS = 1
;; const CHUNK = 128
;;
;; Memory (byte addresses, 16-aligned), laid out by lib/mie/simd-amplitudes.ts:
;;   coefficients: per partial wave n the packed stream of lib/mie/packed-coefficients.ts (6 f64):
;;                 w(a+b) re, im, w(a−b) re, im, (n+1)/n, n  with w = (2n+1)/(n(n+1)) (Bohren & Huffman 1983 eq. 4.74)
;;   cosines:      μ = cos Θ, {2*PAIRS} per group
;;   table:        per order of the chunk, per vector pair q: π+τ, π−τ ({32*PAIRS} bytes; {32*PAIRS*CHUNK} in all)
;;   out:          per angle pair Σ w(a+b)(π+τ) re, im and Σ w(a−b)(π−τ) re, im, two lanes each (8 f64)
(module
  (memory (export "memory") 1)

  ;; π_n, τ_n in Wiscombe's arrangement (1980, Appl. Opt. 19, 1505; MIEV0): s = μπ_n, t = s − π_{n−1},
  ;; τ_n = n·t − π_{n−1}, π_{n+1} = s + (n+1)/n·t, from π_0 = 0, π_1 = 1 (Bohren & Huffman 1983 eq. 4.47).
  (func (export "amplitudes") (param $coefficients i32) (param $nTerms i32) (param $cosines i32) (param $groups i32)
    (param $out i32) (param $table i32)
    (local $k i32) (local $kStart i32) (local $kEnd i32) (local $end i32) (local $g i32) (local $tp i32) (local $o i32)
    (local $h i32)
    (local $sr v128) (local $si v128) (local $dr v128) (local $di v128) (local $f v128) (local $n v128)
    (local $s v128) (local $t v128) (local $tau v128) (local $pp v128) (local $pm v128)
    ;; for q in 0..PAIRS-1
    (local $prev{q} v128) (local $cur{q} v128)
    ;; end for
    ;; for q in 0..SUM_PAIRS-1
    (local $pr{q} v128) (local $pi{q} v128) (local $mr{q} v128) (local $mi{q} v128)
    ;; end for
    (local.set $end (i32.add (local.get $coefficients) (i32.mul (local.get $nTerms) (i32.const 48))))
    (block $done
      (loop $group
        (br_if $done (i32.ge_u (local.get $g) (local.get $groups)))
        ;; for q in 0..PAIRS-1
        (local.set $prev{q} (f64x2.splat (f64.const 0)))
        (local.set $cur{q} (f64x2.splat (f64.const 1)))
        ;; end for
        (memory.fill (local.get $out) (i32.const 0) (i32.const {64*PAIRS}))
        (local.set $kStart (local.get $coefficients))
        (loop $chunk
          (local.set $kEnd (i32.add (local.get $kStart) (i32.const {48*CHUNK})))
          (local.set $kEnd (select (local.get $kEnd) (local.get $end) (i32.lt_u (local.get $kEnd) (local.get $end))))
          (local.set $k (local.get $kStart))
          (local.set $tp (local.get $table))
          ;; μ is read from memory at each use: the registers go to the recurrences' state.
          (loop $fill
            (local.set $f (v128.load64_splat offset=32 align=8 (local.get $k)))
            (local.set $n (v128.load64_splat offset=40 align=8 (local.get $k)))
            ;; for q in 0..PAIRS-1
            (local.set $s (f64x2.mul (v128.load offset={16*q} align=8 (local.get $cosines)) (local.get $cur{q})))
            (local.set $t (f64x2.sub (local.get $s) (local.get $prev{q})))
            (local.set $tau (f64x2.sub (f64x2.mul (local.get $n) (local.get $t)) (local.get $prev{q})))
            (v128.store offset={32*q} align=8 (local.get $tp) (f64x2.add (local.get $cur{q}) (local.get $tau)))
            (v128.store offset={32*q+16} align=8 (local.get $tp) (f64x2.sub (local.get $cur{q}) (local.get $tau)))
            (local.set $prev{q} (local.get $cur{q}))
            (local.set $cur{q} (madd (local.get $f) (local.get $t) (local.get $s)))
            ;; end for
            (local.set $tp (i32.add (local.get $tp) (i32.const {32*PAIRS})))
            (local.set $k (i32.add (local.get $k) (i32.const 48)))
            (br_if $fill (i32.lt_u (local.get $k) (local.get $kEnd))))
          ;; The sums, SUM_PAIRS vectors at a time; h is the byte offset of the first one's table entries.
          (local.set $h (i32.const 0))
          (loop $half
            (local.set $o (i32.add (local.get $out) (i32.shl (local.get $h) (i32.const 1))))
            ;; for q in 0..SUM_PAIRS-1
            (local.set $pr{q} (v128.load offset={64*q} align=8 (local.get $o)))
            (local.set $pi{q} (v128.load offset={64*q+16} align=8 (local.get $o)))
            (local.set $mr{q} (v128.load offset={64*q+32} align=8 (local.get $o)))
            (local.set $mi{q} (v128.load offset={64*q+48} align=8 (local.get $o)))
            ;; end for
            (local.set $k (local.get $kStart))
            (local.set $tp (i32.add (local.get $table) (local.get $h)))
            (loop $term
              (local.set $sr (v128.load64_splat offset=0 align=8 (local.get $k)))
              (local.set $si (v128.load64_splat offset=8 align=8 (local.get $k)))
              (local.set $dr (v128.load64_splat offset=16 align=8 (local.get $k)))
              (local.set $di (v128.load64_splat offset=24 align=8 (local.get $k)))
              ;; for q in 0..SUM_PAIRS-1
              (local.set $pp (v128.load offset={32*q} align=8 (local.get $tp)))
              (local.set $pm (v128.load offset={32*q+16} align=8 (local.get $tp)))
              (local.set $pr{q} (madd (local.get $sr) (local.get $pp) (local.get $pr{q})))
              (local.set $pi{q} (madd (local.get $si) (local.get $pp) (local.get $pi{q})))
              (local.set $mr{q} (madd (local.get $dr) (local.get $pm) (local.get $mr{q})))
              (local.set $mi{q} (madd (local.get $di) (local.get $pm) (local.get $mi{q})))
              ;; end for
              (local.set $tp (i32.add (local.get $tp) (i32.const {32*PAIRS})))
              (local.set $k (i32.add (local.get $k) (i32.const 48)))
              (br_if $term (i32.lt_u (local.get $k) (local.get $kEnd))))
            ;; for q in 0..SUM_PAIRS-1
            (v128.store offset={64*q} align=8 (local.get $o) (local.get $pr{q}))
            (v128.store offset={64*q+16} align=8 (local.get $o) (local.get $pi{q}))
            (v128.store offset={64*q+32} align=8 (local.get $o) (local.get $mr{q}))
            (v128.store offset={64*q+48} align=8 (local.get $o) (local.get $mi{q}))
            ;; end for
            (local.set $h (i32.add (local.get $h) (i32.const {32*SUM_PAIRS})))
            (br_if $half (i32.lt_u (local.get $h) (i32.const {32*PAIRS}))))
          (local.set $kStart (local.get $kEnd))
          (br_if $chunk (i32.lt_u (local.get $kStart) (local.get $end))))
        (local.set $cosines (i32.add (local.get $cosines) (i32.const {16*PAIRS})))
        (local.set $out (i32.add (local.get $out) (i32.const {64*PAIRS})))
        (local.set $g (i32.add (local.get $g) (i32.const 1)))
        (br $group))))
)
