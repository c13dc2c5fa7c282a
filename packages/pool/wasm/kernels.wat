;; WebAssembly SIMD (f64x2) kernels of the OS-ELM autoencoder, the source of
;; src/wasm-binary.ts (assembled by `npm run build:wasm`, wabt). Each kernel
;; does the same floating-point operations in the same order as its
;; TypeScript reference in src/forward.ts and src/sherman-morrison.ts, so
;; the readings agree bit for bit. Pointers are byte offsets into the
;; imported memory; L hidden units, n inputs.
(module
  (memory (import "env" "memory") 1)

  ;; h[i] = b[i] + (Σ_{j even} W[i,j] z[j] + Σ_{j odd} W[i,j] z[j]): lane 0 sums
  ;; even j, lane 1 odd j, as the reference's two partial sums; an odd last j
  ;; goes to the even sum.
  (func (export "forward") (param $w i32) (param $b i32) (param $z i32) (param $h i32) (param $L i32) (param $n i32)
    (local $i i32) (local $j i32) (local $row i32) (local $acc v128) (local $n2 i32) (local $s f64)
    (local.set $n2 (i32.and (local.get $n) (i32.const -2)))
    (block $done (loop $rows
      (br_if $done (i32.ge_u (local.get $i) (local.get $L)))
      (local.set $acc (v128.const f64x2 0 0))
      (local.set $row (i32.add (local.get $w) (i32.shl (i32.mul (local.get $i) (local.get $n)) (i32.const 3))))
      (local.set $j (i32.const 0))
      (block $jd (loop $cols
        (br_if $jd (i32.ge_u (local.get $j) (local.get $n2)))
        (local.set $acc (f64x2.add (local.get $acc)
          (f64x2.mul (v128.load (i32.add (local.get $row) (i32.shl (local.get $j) (i32.const 3))))
                     (v128.load (i32.add (local.get $z) (i32.shl (local.get $j) (i32.const 3)))))))
        (local.set $j (i32.add (local.get $j) (i32.const 2)))
        (br $cols)))
      (local.set $s (f64x2.extract_lane 0 (local.get $acc)))
      (if (i32.lt_u (local.get $j) (local.get $n))
        (then (local.set $s (f64.add (local.get $s)
          (f64.mul (f64.load (i32.add (local.get $row) (i32.shl (local.get $j) (i32.const 3))))
                   (f64.load (i32.add (local.get $z) (i32.shl (local.get $j) (i32.const 3)))))))))
      (f64.store (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 3)))
        (f64.add (f64.load (i32.add (local.get $b) (i32.shl (local.get $i) (i32.const 3))))
                 (f64.add (local.get $s) (f64x2.extract_lane 1 (local.get $acc)))))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $rows))))

  ;; e = z − βᵀh, four rows of β per pass: e[j] −= ((h0 β0j + h1 β1j) + h2 β2j) + h3 β3j,
  ;; then one row at a time; returns Σ e[j]² / n summed in order of j.
  (func (export "residual") (param $beta i32) (param $h i32) (param $z i32) (param $e i32) (param $L i32) (param $n i32) (result f64)
    (local $i i32) (local $j i32) (local $L4 i32) (local $rowBytes i32) (local $r0 i32) (local $r1 i32) (local $r2 i32) (local $r3 i32)
    (local $h0 v128) (local $h1 v128) (local $h2 v128) (local $h3 v128) (local $n2 i32) (local $o i32)
    (local $x0 f64) (local $x1 f64) (local $x2 f64) (local $x3 f64) (local $sum f64) (local $v f64)
    (local.set $n2 (i32.and (local.get $n) (i32.const -2)))
    (local.set $rowBytes (i32.shl (local.get $n) (i32.const 3)))
    (memory.copy (local.get $e) (local.get $z) (local.get $rowBytes))
    (local.set $L4 (i32.and (local.get $L) (i32.const -4)))
    (block $done4 (loop $rows4
      (br_if $done4 (i32.ge_u (local.get $i) (local.get $L4)))
      (local.set $x0 (f64.load (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 3)))))
      (local.set $x1 (f64.load offset=8 (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 3)))))
      (local.set $x2 (f64.load offset=16 (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 3)))))
      (local.set $x3 (f64.load offset=24 (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 3)))))
      (local.set $h0 (f64x2.splat (local.get $x0)))
      (local.set $h1 (f64x2.splat (local.get $x1)))
      (local.set $h2 (f64x2.splat (local.get $x2)))
      (local.set $h3 (f64x2.splat (local.get $x3)))
      (local.set $r0 (i32.add (local.get $beta) (i32.mul (local.get $i) (local.get $rowBytes))))
      (local.set $r1 (i32.add (local.get $r0) (local.get $rowBytes)))
      (local.set $r2 (i32.add (local.get $r1) (local.get $rowBytes)))
      (local.set $r3 (i32.add (local.get $r2) (local.get $rowBytes)))
      (local.set $j (i32.const 0))
      (block $jd (loop $cols
        (br_if $jd (i32.ge_u (local.get $j) (local.get $n2)))
        (local.set $o (i32.shl (local.get $j) (i32.const 3)))
        (v128.store (i32.add (local.get $e) (local.get $o))
          (f64x2.sub (v128.load (i32.add (local.get $e) (local.get $o)))
            (f64x2.add (f64x2.add (f64x2.add
              (f64x2.mul (local.get $h0) (v128.load (i32.add (local.get $r0) (local.get $o))))
              (f64x2.mul (local.get $h1) (v128.load (i32.add (local.get $r1) (local.get $o)))))
              (f64x2.mul (local.get $h2) (v128.load (i32.add (local.get $r2) (local.get $o)))))
              (f64x2.mul (local.get $h3) (v128.load (i32.add (local.get $r3) (local.get $o)))))))
        (local.set $j (i32.add (local.get $j) (i32.const 2)))
        (br $cols)))
      (if (i32.lt_u (local.get $j) (local.get $n))
        (then
          (local.set $o (i32.shl (local.get $j) (i32.const 3)))
          (f64.store (i32.add (local.get $e) (local.get $o))
            (f64.sub (f64.load (i32.add (local.get $e) (local.get $o)))
              (f64.add (f64.add (f64.add
                (f64.mul (local.get $x0) (f64.load (i32.add (local.get $r0) (local.get $o))))
                (f64.mul (local.get $x1) (f64.load (i32.add (local.get $r1) (local.get $o)))))
                (f64.mul (local.get $x2) (f64.load (i32.add (local.get $r2) (local.get $o)))))
                (f64.mul (local.get $x3) (f64.load (i32.add (local.get $r3) (local.get $o)))))))))
      (local.set $i (i32.add (local.get $i) (i32.const 4)))
      (br $rows4)))
    (block $done1 (loop $rows1
      (br_if $done1 (i32.ge_u (local.get $i) (local.get $L)))
      (local.set $x0 (f64.load (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 3)))))
      (local.set $r0 (i32.add (local.get $beta) (i32.mul (local.get $i) (local.get $rowBytes))))
      (local.set $j (i32.const 0))
      (block $jd1 (loop $cols1
        (br_if $jd1 (i32.ge_u (local.get $j) (local.get $n)))
        (local.set $o (i32.shl (local.get $j) (i32.const 3)))
        (f64.store (i32.add (local.get $e) (local.get $o))
          (f64.sub (f64.load (i32.add (local.get $e) (local.get $o)))
            (f64.mul (local.get $x0) (f64.load (i32.add (local.get $r0) (local.get $o))))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $cols1)))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $rows1)))
    (local.set $j (i32.const 0))
    (block $sd (loop $squares
      (br_if $sd (i32.ge_u (local.get $j) (local.get $n)))
      (local.set $v (f64.load (i32.add (local.get $e) (i32.shl (local.get $j) (i32.const 3)))))
      (local.set $sum (f64.add (local.get $sum) (f64.mul (local.get $v) (local.get $v))))
      (local.set $j (i32.add (local.get $j) (i32.const 1)))
      (br $squares)))
    (f64.div (local.get $sum) (f64.convert_i32_u (local.get $n))))

  ;; β[i,j] += k[i]·e[j] for β of L rows × n columns.
  (func (export "rankOne") (param $beta i32) (param $k i32) (param $e i32) (param $L i32) (param $n i32)
    (local $i i32) (local $j i32) (local $row i32) (local $ki f64) (local $kv v128) (local $n2 i32) (local $o i32)
    (local.set $n2 (i32.and (local.get $n) (i32.const -2)))
    (block $done (loop $rows
      (br_if $done (i32.ge_u (local.get $i) (local.get $L)))
      (local.set $ki (f64.load (i32.add (local.get $k) (i32.shl (local.get $i) (i32.const 3)))))
      (local.set $kv (f64x2.splat (local.get $ki)))
      (local.set $row (i32.add (local.get $beta) (i32.shl (i32.mul (local.get $i) (local.get $n)) (i32.const 3))))
      (local.set $j (i32.const 0))
      (block $jd (loop $cols
        (br_if $jd (i32.ge_u (local.get $j) (local.get $n2)))
        (local.set $o (i32.shl (local.get $j) (i32.const 3)))
        (v128.store (i32.add (local.get $row) (local.get $o))
          (f64x2.add (v128.load (i32.add (local.get $row) (local.get $o)))
            (f64x2.mul (local.get $kv) (v128.load (i32.add (local.get $e) (local.get $o))))))
        (local.set $j (i32.add (local.get $j) (i32.const 2)))
        (br $cols)))
      (if (i32.lt_u (local.get $j) (local.get $n))
        (then
          (local.set $o (i32.shl (local.get $j) (i32.const 3)))
          (f64.store (i32.add (local.get $row) (local.get $o))
            (f64.add (f64.load (i32.add (local.get $row) (local.get $o)))
              (f64.mul (local.get $ki) (f64.load (i32.add (local.get $e) (local.get $o))))))))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $rows))))
;; β += G·E for a chunk of k rows, as addGainTimesResiduals in src/woodbury.ts:
  ;; for each row i of β, sum[j] = 0, then for each block of four rows r
  ;; sum[j] += ((g_r e_rj + g_r+1 e_r+1,j) + g_r+2 e_r+2,j) + g_r+3 e_r+3,j, then the
  ;; rows left one by one (sum[j] += g_r e_rj), then β[i,j] += sum[j]; lanes over j.
  ;; gt: Gᵀ (k × L), e: the residual rows (k × n), sum: n scratch values.
  (func (export "gainUpdate") (param $beta i32) (param $gt i32) (param $e i32) (param $sum i32) (param $k i32) (param $L i32) (param $n i32)
    (local $i i32) (local $r i32) (local $j i32) (local $o i32) (local $n2 i32) (local $nb i32) (local $row i32)
    (local $e0 i32) (local $e1 i32) (local $e2 i32) (local $e3 i32)
    (local $g0 f64) (local $g1 f64) (local $g2 f64) (local $g3 f64)
    (local $v0 v128) (local $v1 v128) (local $v2 v128) (local $v3 v128)
    (local.set $n2 (i32.and (local.get $n) (i32.const -2)))
    (local.set $nb (i32.shl (local.get $n) (i32.const 3)))
    (block $done (loop $rows
      (br_if $done (i32.ge_u (local.get $i) (local.get $L)))
      ;; sum = 0
      (local.set $j (i32.const 0))
      (block $zd (loop $zero
        (br_if $zd (i32.ge_u (local.get $j) (local.get $n)))
        (f64.store (i32.add (local.get $sum) (i32.shl (local.get $j) (i32.const 3))) (f64.const 0))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $zero)))
      ;; blocks of four rows
      (local.set $r (i32.const 0))
      (block $bd (loop $blocks
        (br_if $bd (i32.ge_s (i32.add (local.get $r) (i32.const 3)) (local.get $k)))
        (local.set $g0 (f64.load (i32.add (local.get $gt) (i32.shl (i32.add (i32.mul (local.get $r) (local.get $L)) (local.get $i)) (i32.const 3)))))
        (local.set $g1 (f64.load (i32.add (local.get $gt) (i32.shl (i32.add (i32.mul (i32.add (local.get $r) (i32.const 1)) (local.get $L)) (local.get $i)) (i32.const 3)))))
        (local.set $g2 (f64.load (i32.add (local.get $gt) (i32.shl (i32.add (i32.mul (i32.add (local.get $r) (i32.const 2)) (local.get $L)) (local.get $i)) (i32.const 3)))))
        (local.set $g3 (f64.load (i32.add (local.get $gt) (i32.shl (i32.add (i32.mul (i32.add (local.get $r) (i32.const 3)) (local.get $L)) (local.get $i)) (i32.const 3)))))
        (local.set $v0 (f64x2.splat (local.get $g0)))
        (local.set $v1 (f64x2.splat (local.get $g1)))
        (local.set $v2 (f64x2.splat (local.get $g2)))
        (local.set $v3 (f64x2.splat (local.get $g3)))
        (local.set $e0 (i32.add (local.get $e) (i32.mul (local.get $r) (local.get $nb))))
        (local.set $e1 (i32.add (local.get $e0) (local.get $nb)))
        (local.set $e2 (i32.add (local.get $e1) (local.get $nb)))
        (local.set $e3 (i32.add (local.get $e2) (local.get $nb)))
        (local.set $j (i32.const 0))
        (block $cd (loop $cols
          (br_if $cd (i32.ge_u (local.get $j) (local.get $n2)))
          (local.set $o (i32.shl (local.get $j) (i32.const 3)))
          (v128.store (i32.add (local.get $sum) (local.get $o))
            (f64x2.add (v128.load (i32.add (local.get $sum) (local.get $o)))
              (f64x2.add
                (f64x2.add
                  (f64x2.add
                    (f64x2.mul (local.get $v0) (v128.load (i32.add (local.get $e0) (local.get $o))))
                    (f64x2.mul (local.get $v1) (v128.load (i32.add (local.get $e1) (local.get $o)))))
                  (f64x2.mul (local.get $v2) (v128.load (i32.add (local.get $e2) (local.get $o)))))
                (f64x2.mul (local.get $v3) (v128.load (i32.add (local.get $e3) (local.get $o)))))))
          (local.set $j (i32.add (local.get $j) (i32.const 2)))
          (br $cols)))
        (if (i32.lt_u (local.get $j) (local.get $n))
          (then
            (local.set $o (i32.shl (local.get $j) (i32.const 3)))
            (f64.store (i32.add (local.get $sum) (local.get $o))
              (f64.add (f64.load (i32.add (local.get $sum) (local.get $o)))
                (f64.add
                  (f64.add
                    (f64.add
                      (f64.mul (local.get $g0) (f64.load (i32.add (local.get $e0) (local.get $o))))
                      (f64.mul (local.get $g1) (f64.load (i32.add (local.get $e1) (local.get $o)))))
                    (f64.mul (local.get $g2) (f64.load (i32.add (local.get $e2) (local.get $o)))))
                  (f64.mul (local.get $g3) (f64.load (i32.add (local.get $e3) (local.get $o)))))))))
        (local.set $r (i32.add (local.get $r) (i32.const 4)))
        (br $blocks)))
      ;; the rows left, one by one
      (block $ld (loop $left
        (br_if $ld (i32.ge_s (local.get $r) (local.get $k)))
        (local.set $g0 (f64.load (i32.add (local.get $gt) (i32.shl (i32.add (i32.mul (local.get $r) (local.get $L)) (local.get $i)) (i32.const 3)))))
        (local.set $v0 (f64x2.splat (local.get $g0)))
        (local.set $e0 (i32.add (local.get $e) (i32.mul (local.get $r) (local.get $nb))))
        (local.set $j (i32.const 0))
        (block $cd1 (loop $cols1
          (br_if $cd1 (i32.ge_u (local.get $j) (local.get $n2)))
          (local.set $o (i32.shl (local.get $j) (i32.const 3)))
          (v128.store (i32.add (local.get $sum) (local.get $o))
            (f64x2.add (v128.load (i32.add (local.get $sum) (local.get $o)))
              (f64x2.mul (local.get $v0) (v128.load (i32.add (local.get $e0) (local.get $o))))))
          (local.set $j (i32.add (local.get $j) (i32.const 2)))
          (br $cols1)))
        (if (i32.lt_u (local.get $j) (local.get $n))
          (then
            (local.set $o (i32.shl (local.get $j) (i32.const 3)))
            (f64.store (i32.add (local.get $sum) (local.get $o))
              (f64.add (f64.load (i32.add (local.get $sum) (local.get $o)))
                (f64.mul (local.get $g0) (f64.load (i32.add (local.get $e0) (local.get $o))))))))
        (local.set $r (i32.add (local.get $r) (i32.const 1)))
        (br $left)))
      ;; β[i] += sum
      (local.set $row (i32.add (local.get $beta) (i32.mul (local.get $i) (local.get $nb))))
      (local.set $j (i32.const 0))
      (block $ad (loop $add
        (br_if $ad (i32.ge_u (local.get $j) (local.get $n2)))
        (local.set $o (i32.shl (local.get $j) (i32.const 3)))
        (v128.store (i32.add (local.get $row) (local.get $o))
          (f64x2.add (v128.load (i32.add (local.get $row) (local.get $o))) (v128.load (i32.add (local.get $sum) (local.get $o)))))
        (local.set $j (i32.add (local.get $j) (i32.const 2)))
        (br $add)))
      (if (i32.lt_u (local.get $j) (local.get $n))
        (then
          (local.set $o (i32.shl (local.get $j) (i32.const 3)))
          (f64.store (i32.add (local.get $row) (local.get $o))
            (f64.add (f64.load (i32.add (local.get $row) (local.get $o))) (f64.load (i32.add (local.get $sum) (local.get $o)))))))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $rows))))
    ;; float32 state (f32x4 lanes, arithmetic in float32): h[i] = b[i] + Σ_j W[i,j] z[j],
  ;; lane l summing j ≡ l (mod 4), the lanes added as (l0 + l1) + (l2 + l3), the
  ;; last n mod 4 inputs added one by one after them.
  (func (export "forward32") (param $w i32) (param $b i32) (param $z i32) (param $h i32) (param $L i32) (param $n i32)
    (local $i i32) (local $j i32) (local $row i32) (local $acc v128) (local $n4 i32) (local $s f32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (block $done (loop $rows
      (br_if $done (i32.ge_u (local.get $i) (local.get $L)))
      (local.set $acc (v128.const f32x4 0 0 0 0))
      (local.set $row (i32.add (local.get $w) (i32.shl (i32.mul (local.get $i) (local.get $n)) (i32.const 2))))
      (local.set $j (i32.const 0))
      (block $jd (loop $cols
        (br_if $jd (i32.ge_u (local.get $j) (local.get $n4)))
        (local.set $acc (f32x4.add (local.get $acc)
          (f32x4.mul (v128.load (i32.add (local.get $row) (i32.shl (local.get $j) (i32.const 2))))
                     (v128.load (i32.add (local.get $z) (i32.shl (local.get $j) (i32.const 2)))))))
        (local.set $j (i32.add (local.get $j) (i32.const 4)))
        (br $cols)))
      (local.set $s (f32.add
        (f32.add (f32x4.extract_lane 0 (local.get $acc)) (f32x4.extract_lane 1 (local.get $acc)))
        (f32.add (f32x4.extract_lane 2 (local.get $acc)) (f32x4.extract_lane 3 (local.get $acc)))))
      (block $td (loop $tail
        (br_if $td (i32.ge_u (local.get $j) (local.get $n)))
        (local.set $s (f32.add (local.get $s)
          (f32.mul (f32.load (i32.add (local.get $row) (i32.shl (local.get $j) (i32.const 2))))
                   (f32.load (i32.add (local.get $z) (i32.shl (local.get $j) (i32.const 2)))))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $tail)))
      (f32.store (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 2)))
        (f32.add (f32.load (i32.add (local.get $b) (i32.shl (local.get $i) (i32.const 2)))) (local.get $s)))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $rows))))

  ;; float32 state: e = z − βᵀh in float32, four rows of β per pass
  ;; (e[j] −= ((h0 β0j + h1 β1j) + h2 β2j) + h3 β3j), then one row at a time;
  ;; returns Σ e[j]² / n, each e[j] widened to float64 and summed in order of j.
  (func (export "residual32") (param $beta i32) (param $h i32) (param $z i32) (param $e i32) (param $L i32) (param $n i32) (result f64)
    (local $i i32) (local $j i32) (local $L4 i32) (local $rowBytes i32) (local $r0 i32) (local $r1 i32) (local $r2 i32) (local $r3 i32)
    (local $h0 v128) (local $h1 v128) (local $h2 v128) (local $h3 v128) (local $n4 i32) (local $o i32)
    (local $x0 f32) (local $x1 f32) (local $x2 f32) (local $x3 f32) (local $sum f64) (local $v f64)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (local.set $rowBytes (i32.shl (local.get $n) (i32.const 2)))
    (memory.copy (local.get $e) (local.get $z) (local.get $rowBytes))
    (local.set $L4 (i32.and (local.get $L) (i32.const -4)))
    (block $done4 (loop $rows4
      (br_if $done4 (i32.ge_u (local.get $i) (local.get $L4)))
      (local.set $x0 (f32.load (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 2)))))
      (local.set $x1 (f32.load offset=4 (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 2)))))
      (local.set $x2 (f32.load offset=8 (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 2)))))
      (local.set $x3 (f32.load offset=12 (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 2)))))
      (local.set $h0 (f32x4.splat (local.get $x0)))
      (local.set $h1 (f32x4.splat (local.get $x1)))
      (local.set $h2 (f32x4.splat (local.get $x2)))
      (local.set $h3 (f32x4.splat (local.get $x3)))
      (local.set $r0 (i32.add (local.get $beta) (i32.mul (local.get $i) (local.get $rowBytes))))
      (local.set $r1 (i32.add (local.get $r0) (local.get $rowBytes)))
      (local.set $r2 (i32.add (local.get $r1) (local.get $rowBytes)))
      (local.set $r3 (i32.add (local.get $r2) (local.get $rowBytes)))
      (local.set $j (i32.const 0))
      (block $jd (loop $cols
        (br_if $jd (i32.ge_u (local.get $j) (local.get $n4)))
        (local.set $o (i32.shl (local.get $j) (i32.const 2)))
        (v128.store (i32.add (local.get $e) (local.get $o))
          (f32x4.sub (v128.load (i32.add (local.get $e) (local.get $o)))
            (f32x4.add (f32x4.add (f32x4.add
              (f32x4.mul (local.get $h0) (v128.load (i32.add (local.get $r0) (local.get $o))))
              (f32x4.mul (local.get $h1) (v128.load (i32.add (local.get $r1) (local.get $o)))))
              (f32x4.mul (local.get $h2) (v128.load (i32.add (local.get $r2) (local.get $o)))))
              (f32x4.mul (local.get $h3) (v128.load (i32.add (local.get $r3) (local.get $o)))))))
        (local.set $j (i32.add (local.get $j) (i32.const 4)))
        (br $cols)))
      (block $td (loop $tail
        (br_if $td (i32.ge_u (local.get $j) (local.get $n)))
        (local.set $o (i32.shl (local.get $j) (i32.const 2)))
        (f32.store (i32.add (local.get $e) (local.get $o))
          (f32.sub (f32.load (i32.add (local.get $e) (local.get $o)))
            (f32.add (f32.add (f32.add
              (f32.mul (local.get $x0) (f32.load (i32.add (local.get $r0) (local.get $o))))
              (f32.mul (local.get $x1) (f32.load (i32.add (local.get $r1) (local.get $o)))))
              (f32.mul (local.get $x2) (f32.load (i32.add (local.get $r2) (local.get $o)))))
              (f32.mul (local.get $x3) (f32.load (i32.add (local.get $r3) (local.get $o)))))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $tail)))
      (local.set $i (i32.add (local.get $i) (i32.const 4)))
      (br $rows4)))
    (block $done1 (loop $rows1
      (br_if $done1 (i32.ge_u (local.get $i) (local.get $L)))
      (local.set $x0 (f32.load (i32.add (local.get $h) (i32.shl (local.get $i) (i32.const 2)))))
      (local.set $r0 (i32.add (local.get $beta) (i32.mul (local.get $i) (local.get $rowBytes))))
      (local.set $j (i32.const 0))
      (block $jd1 (loop $cols1
        (br_if $jd1 (i32.ge_u (local.get $j) (local.get $n)))
        (local.set $o (i32.shl (local.get $j) (i32.const 2)))
        (f32.store (i32.add (local.get $e) (local.get $o))
          (f32.sub (f32.load (i32.add (local.get $e) (local.get $o)))
            (f32.mul (local.get $x0) (f32.load (i32.add (local.get $r0) (local.get $o))))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $cols1)))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $rows1)))
    (local.set $j (i32.const 0))
    (block $sd (loop $squares
      (br_if $sd (i32.ge_u (local.get $j) (local.get $n)))
      (local.set $v (f64.promote_f32 (f32.load (i32.add (local.get $e) (i32.shl (local.get $j) (i32.const 2))))))
      (local.set $sum (f64.add (local.get $sum) (f64.mul (local.get $v) (local.get $v))))
      (local.set $j (i32.add (local.get $j) (i32.const 1)))
      (br $squares)))
    (f64.div (local.get $sum) (f64.convert_i32_u (local.get $n))))

  ;; float32 state: β[i,j] += k[i]·e[j] in float32, for β of L rows × n columns.
  (func (export "rankOne32") (param $beta i32) (param $k i32) (param $e i32) (param $L i32) (param $n i32)
    (local $i i32) (local $j i32) (local $row i32) (local $ki f32) (local $kv v128) (local $n4 i32) (local $o i32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (block $done (loop $rows
      (br_if $done (i32.ge_u (local.get $i) (local.get $L)))
      (local.set $ki (f32.load (i32.add (local.get $k) (i32.shl (local.get $i) (i32.const 2)))))
      (local.set $kv (f32x4.splat (local.get $ki)))
      (local.set $row (i32.add (local.get $beta) (i32.shl (i32.mul (local.get $i) (local.get $n)) (i32.const 2))))
      (local.set $j (i32.const 0))
      (block $jd (loop $cols
        (br_if $jd (i32.ge_u (local.get $j) (local.get $n4)))
        (local.set $o (i32.shl (local.get $j) (i32.const 2)))
        (v128.store (i32.add (local.get $row) (local.get $o))
          (f32x4.add (v128.load (i32.add (local.get $row) (local.get $o)))
            (f32x4.mul (local.get $kv) (v128.load (i32.add (local.get $e) (local.get $o))))))
        (local.set $j (i32.add (local.get $j) (i32.const 4)))
        (br $cols)))
      (block $td (loop $tail
        (br_if $td (i32.ge_u (local.get $j) (local.get $n)))
        (local.set $o (i32.shl (local.get $j) (i32.const 2)))
        (f32.store (i32.add (local.get $row) (local.get $o))
          (f32.add (f32.load (i32.add (local.get $row) (local.get $o)))
            (f32.mul (local.get $ki) (f32.load (i32.add (local.get $e) (local.get $o))))))
        (local.set $j (i32.add (local.get $j) (i32.const 1)))
        (br $tail)))
      (local.set $i (i32.add (local.get $i) (i32.const 1)))
      (br $rows)))))
