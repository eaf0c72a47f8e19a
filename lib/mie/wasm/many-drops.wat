;; S1 ± S2 of many drops at once over a group of up to BLOCKS blocks of 4 angles (2 f64x2 vectors each; nBlocks
;; even, the sums take blocks in pairs), for lib/mie/many-drops.ts. The angular functions depend on the angle only: π_n ± τ_n are computed once per block and
;; chunk of orders into a table, then every drop's sums Σ w(a±b)(π±τ) read that table (a dense product: each loaded
;; table value serves two of the drop's 4 coefficients, each coefficient 8 angles). A drop's chunk of coefficients
;; then serves every block of the group while it is in the first-level cache: a profile task's coefficients (up to
;; 24 MiB) are read from memory once per group of angles rather than once per block of 4. Per drop and angle the
;; sums run over n in the same order and with the same operations as lib/mie/wasm/amplitudes.wat and
;; mieAmplitudesScalar (lib/mie/amplitudes.ts), so the exact module gives the per-call kernels' sums to the last bit.
;; Same text extensions as amplitudes.wat (scripts/compile-wat.mjs): ;; const, ;; for … ;; end for, {expr}, madd.
;; const CHUNK = 32
;; const BLOCKS = 32
;;
;; Memory (byte addresses, 16-aligned), laid out by lib/mie/many-drops.ts:
;;   orders:   per n = 1..nMax (index n−1): (n+1)/n, n  (16 bytes; as in lib/mie/packed-coefficients.ts)
;;   drops:    per drop: i32 address of its packed coefficient stream (lib/mie/packed-coefficients.ts), i32 nTerms
;;   cosines:  per block its 4 μ = cos Θ (32 bytes)
;;   state:    per block μ, π_{n−1}, π_n of its 2 vectors between chunks (96 bytes)
;;   table:    per block (64·CHUNK bytes) and order in the chunk: π+τ for vectors 0, 1, then π−τ for vectors 0, 1
;;   sums:     per drop and block (128 bytes at sums + 128·(drop·nBlocks + block)): Σ w(a+b)(π+τ) re, im,
;;             Σ w(a−b)(π−τ) re, im for vector 0, then for vector 1
(module
  (memory (export "memory") 1)

  (func (export "manyDrops") (param $orders i32) (param $nMax i32) (param $drops i32) (param $nDrops i32)
    (param $cosines i32) (param $nBlocks i32) (param $state i32) (param $table i32) (param $sums i32)
    (local $i0 i32) (local $i1 i32) (local $e i32) (local $d i32) (local $g i32) (local $row i32) (local $k i32)
    (local $k0 i32) (local $kEnd i32) (local $tp i32) (local $o i32) (local $st i32)
    (local $f v128) (local $n v128) (local $s v128) (local $t v128) (local $tau v128)
    (local $cr v128) (local $ci v128) (local $p v128)
    ;; for q in 0..1
    (local $kEnd{q} i32) (local $tp{q} i32)
    ;; end for
    ;; for v in 0..3
    (local $re{v} v128) (local $im{v} v128) (local $prev{v} v128) (local $cur{v} v128)
    ;; end for
    ;; The recurrence state lives in memory between chunks, so that no register holds it through the drop loop.
    (loop $init
      (local.set $st (i32.add (local.get $state) (i32.mul (local.get $g) (i32.const 96))))
      (local.set $o (i32.add (local.get $cosines) (i32.shl (local.get $g) (i32.const 5))))
      ;; for q in 0..1
      (v128.store offset={48*q} align=8 (local.get $st) (v128.load offset={16*q} align=8 (local.get $o)))
      (v128.store offset={48*q+16} align=8 (local.get $st) (f64x2.splat (f64.const 0)))
      (v128.store offset={48*q+32} align=8 (local.get $st) (f64x2.splat (f64.const 1)))
      ;; end for
      (local.set $g (i32.add (local.get $g) (i32.const 1)))
      (br_if $init (i32.lt_u (local.get $g) (local.get $nBlocks))))
    (memory.fill (local.get $sums) (i32.const 0) (i32.mul (i32.mul (local.get $nDrops) (local.get $nBlocks)) (i32.const 128)))
    (block $done
      (loop $chunk
        (br_if $done (i32.ge_u (local.get $i0) (local.get $nMax)))
        (local.set $i1 (select (i32.add (local.get $i0) (i32.const {CHUNK})) (local.get $nMax)
          (i32.lt_u (i32.add (local.get $i0) (i32.const {CHUNK})) (local.get $nMax))))
        ;; π_n ± τ_n for n in the chunk, each block's table, Wiscombe's arrangement (1980, Appl. Opt. 19,
        ;; 1505): s = μπ_n, t = s − π_{n−1}, τ_n = n·t − π_{n−1}, π_{n+1} = s + (n+1)/n·t (Bohren & Huffman 1983 eq. 4.47).
        ;; Blocks in pairs, 4 vectors c (block g + (c >> 1), vector c & 1): 4 recurrences on independent chains
        ;; (one pair of chains waited on the latency of its 5 dependent operations every order); μ is read from the
        ;; state each order, off the chains, so that π_{n−1}, π_n of all 4 stay in registers.
        (local.set $g (i32.const 0))
        (loop $block
          (local.set $st (i32.add (local.get $state) (i32.mul (local.get $g) (i32.const 96))))
          (local.set $o (i32.add (local.get $orders) (i32.shl (local.get $i0) (i32.const 4))))
          (local.set $tp (i32.add (local.get $table) (i32.mul (local.get $g) (i32.const {64*CHUNK}))))
          (local.set $kEnd (i32.add (local.get $orders) (i32.shl (local.get $i1) (i32.const 4))))
          ;; for c in 0..3
          (local.set $prev{c} (v128.load offset={96*(c>>1)+48*(c&1)+16} align=8 (local.get $st)))
          (local.set $cur{c} (v128.load offset={96*(c>>1)+48*(c&1)+32} align=8 (local.get $st)))
          ;; end for
          (loop $fill
            (local.set $f (v128.load64_splat offset=0 align=8 (local.get $o)))
            (local.set $n (v128.load64_splat offset=8 align=8 (local.get $o)))
            ;; for c in 0..3
            (local.set $s (f64x2.mul (v128.load offset={96*(c>>1)+48*(c&1)} align=8 (local.get $st)) (local.get $cur{c})))
            (local.set $t (f64x2.sub (local.get $s) (local.get $prev{c})))
            (local.set $tau (f64x2.sub (f64x2.mul (local.get $n) (local.get $t)) (local.get $prev{c})))
            (v128.store offset={64*CHUNK*(c>>1)+16*(c&1)} align=8 (local.get $tp) (f64x2.add (local.get $cur{c}) (local.get $tau)))
            (v128.store offset={64*CHUNK*(c>>1)+32+16*(c&1)} align=8 (local.get $tp) (f64x2.sub (local.get $cur{c}) (local.get $tau)))
            (local.set $prev{c} (local.get $cur{c}))
            (local.set $cur{c} (madd (local.get $f) (local.get $t) (local.get $s)))
            ;; end for
            (local.set $tp (i32.add (local.get $tp) (i32.const 64)))
            (local.set $o (i32.add (local.get $o) (i32.const 16)))
            (br_if $fill (i32.lt_u (local.get $o) (local.get $kEnd))))
          ;; for c in 0..3
          (v128.store offset={96*(c>>1)+48*(c&1)+16} align=8 (local.get $st) (local.get $prev{c}))
          (v128.store offset={96*(c>>1)+48*(c&1)+32} align=8 (local.get $st) (local.get $cur{c}))
          ;; end for
          (local.set $g (i32.add (local.get $g) (i32.const 2)))
          (br_if $block (i32.lt_u (local.get $g) (local.get $nBlocks))))
        ;; Each drop's sums over the orders of the chunk it has (n ≤ its nTerms), block by block.
        (local.set $d (i32.const 0))
        (loop $drop
          (local.set $row (i32.add (local.get $drops) (i32.shl (local.get $d) (i32.const 3))))
          (local.set $e (i32.load offset=4 (local.get $row)))
          (local.set $e (select (local.get $i1) (local.get $e) (i32.lt_u (local.get $i1) (local.get $e))))
          (if (i32.gt_u (local.get $e) (local.get $i0))
            (then
              (local.set $k0 (i32.add (i32.load (local.get $row)) (i32.mul (local.get $i0) (i32.const 48))))
              (local.set $kEnd (i32.add (i32.load (local.get $row)) (i32.mul (local.get $e) (i32.const 48))))
              (local.set $g (i32.const 0))
              (loop $blockSums
                (local.set $tp (i32.add (local.get $table) (i32.mul (local.get $g) (i32.const {64*CHUNK}))))
                (local.set $o (i32.add (local.get $sums)
                  (i32.shl (i32.add (i32.mul (local.get $d) (local.get $nBlocks)) (local.get $g)) (i32.const 7))))
                ;; Blocks g and g + 1 (4 vectors v: block g + (v >> 1), vector v & 1): S₊ = Σ w(a+b)(π+τ) (loop
                ;; $term0), then S₋ = Σ w(a−b)(π−τ) ($term1), each in a loop of its own. 8 sums on independent chains
                ;; keep the adders busy (4 waited on the adder's latency), and with 2 coefficients and the table
                ;; vectors they fit x64's 16 vector registers (all 16 sums in one loop pushed some to the stack, a
                ;; store and a load on their chains every order).
                (local.set $k (i32.add (local.get $k0) (i32.const 0)))
                (local.set $kEnd0 (i32.add (local.get $kEnd) (i32.const 0)))
                (local.set $tp0 (i32.add (local.get $tp) (i32.const 0)))
                ;; for v in 0..3
                (local.set $re{v} (v128.load offset={128*(v>>1)+64*(v&1)+0} align=8 (local.get $o)))
                (local.set $im{v} (v128.load offset={128*(v>>1)+64*(v&1)+16} align=8 (local.get $o)))
                ;; end for
                (loop $term0
                  (local.set $cr (v128.load64_splat offset=0 align=8 (local.get $k)))
                  (local.set $ci (v128.load64_splat offset=8 align=8 (local.get $k)))
                  ;; for v in 0..3
                  (local.set $p (v128.load offset={64*CHUNK*(v>>1)+16*(v&1)} align=8 (local.get $tp0)))
                  (local.set $re{v} (madd (local.get $cr) (local.get $p) (local.get $re{v})))
                  (local.set $im{v} (madd (local.get $ci) (local.get $p) (local.get $im{v})))
                  ;; end for
                  (local.set $tp0 (i32.add (local.get $tp0) (i32.const 64)))
                  (local.set $k (i32.add (local.get $k) (i32.const 48)))
                  (br_if $term0 (i32.lt_u (local.get $k) (local.get $kEnd0))))
                ;; for v in 0..3
                (v128.store offset={128*(v>>1)+64*(v&1)+0} align=8 (local.get $o) (local.get $re{v}))
                (v128.store offset={128*(v>>1)+64*(v&1)+16} align=8 (local.get $o) (local.get $im{v}))
                ;; end for
                (local.set $k (i32.add (local.get $k0) (i32.const 16)))
                (local.set $kEnd1 (i32.add (local.get $kEnd) (i32.const 16)))
                (local.set $tp1 (i32.add (local.get $tp) (i32.const 32)))
                ;; for v in 0..3
                (local.set $re{v} (v128.load offset={128*(v>>1)+64*(v&1)+32} align=8 (local.get $o)))
                (local.set $im{v} (v128.load offset={128*(v>>1)+64*(v&1)+48} align=8 (local.get $o)))
                ;; end for
                (loop $term1
                  (local.set $cr (v128.load64_splat offset=0 align=8 (local.get $k)))
                  (local.set $ci (v128.load64_splat offset=8 align=8 (local.get $k)))
                  ;; for v in 0..3
                  (local.set $p (v128.load offset={64*CHUNK*(v>>1)+16*(v&1)} align=8 (local.get $tp1)))
                  (local.set $re{v} (madd (local.get $cr) (local.get $p) (local.get $re{v})))
                  (local.set $im{v} (madd (local.get $ci) (local.get $p) (local.get $im{v})))
                  ;; end for
                  (local.set $tp1 (i32.add (local.get $tp1) (i32.const 64)))
                  (local.set $k (i32.add (local.get $k) (i32.const 48)))
                  (br_if $term1 (i32.lt_u (local.get $k) (local.get $kEnd1))))
                ;; for v in 0..3
                (v128.store offset={128*(v>>1)+64*(v&1)+32} align=8 (local.get $o) (local.get $re{v}))
                (v128.store offset={128*(v>>1)+64*(v&1)+48} align=8 (local.get $o) (local.get $im{v}))
                ;; end for
                (local.set $g (i32.add (local.get $g) (i32.const 2)))
                (br_if $blockSums (i32.lt_u (local.get $g) (local.get $nBlocks))))))
          (local.set $d (i32.add (local.get $d) (i32.const 1)))
          (br_if $drop (i32.lt_u (local.get $d) (local.get $nDrops))))
        (local.set $i0 (local.get $i1))
        (br $chunk)))
  )
)
