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
      (br $rows)))))
