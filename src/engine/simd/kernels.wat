;; Farfield's SIMD kernels. They run on the tfjs WASM backend's own memory
;; (imported), so they read inputs and write outputs in place, with no copies.
;;
;; Bit-identity rule: every output element is computed with exactly the
;; float32 operations, in exactly the order, of the code path it replaces, so
;; results (and fingerprints) do not depend on which path ran:
;;   mm_tn, mm_nn C = Aᵀ·B or act(bias + A·B); each C[i,j] = ((bias + a0·b0) + a1·b1) + …
;;                in k order, the order of the backend's XNNPACK matmul.
;;   gather_pair_add   p[src] + p[dst] + b summed in float64 and rounded once,
;;                as the JavaScript loop it replaces does.
;;   scatter_pair, scatter_by_arg   float32 sums in edge order (a float64 sum of two
;;                float32 values rounded to float32 equals the float32 sum).
;;   segment_extreme   comparisons only; ties keep the lowest edge, a NaN wins.
;;   copy_block   a strided copy of 4-byte values (concat and split).
;;   adam_step    tfjs's Adam update, op for op in float32 (see src/train/adam.ts).
;;   sum_squares  ((0 + x0·x0) + x1·x1) + … in order, as Sum(Square(x)) does.
;;   equal3       a == b (1 byte per result) over a broadcast of up to 3 axes; exact.
;;   col_sum      out[c] = ((0 + x[0,c]) + x[1,c]) + … in row order, the order of
;;                the backend's Sum after it transposes the reduced axes inward.
;;   neg, shift_div, mul_div_neg   the smooth aggregators' elementwise steps, one
;;                float32 operation each (Neg, Sub then RealDiv, Mul then RealDiv).
;;   semiring_hard, semiring_shift, semiring_totals, semiring_hard_grad, semiring_smooth_grad
;;                the semiring message layers' [N, H, H] steps and their gradients, each
;;                element the stock composition's float32 operations in its order.
;; Pointers are byte offsets into the shared memory; sizes are element counts.
(module
  (import "env" "memory" (memory 1))

  ;; One C element the plain way (edge rows and columns of a product).
  ;; A(i, k) sits at a + 4·(i·rs + k·ks); B is [K, N] row-major.
  ;; The sum starts from bias[j] when $bias is not 0 (no tensor lives at address 0), else from 0,
  ;; as the backend's matmul does. (A sign test would misread offsets past 2 GiB.)
  (func $dot (param $a i32) (param $b i32) (param $K i32) (param $rs i32) (param $ks i32) (param $N i32) (param $i i32) (param $j i32) (param $bias i32) (result f32)
    (local $acc f32) (local $pa i32) (local $pb i32) (local $k i32) (local $sa i32) (local $sb i32)
    (local.set $pa (i32.add (local.get $a) (i32.shl (i32.mul (local.get $i) (local.get $rs)) (i32.const 2))))
    (local.set $pb (i32.add (local.get $b) (i32.shl (local.get $j) (i32.const 2))))
    (local.set $sa (i32.shl (local.get $ks) (i32.const 2)))
    (local.set $sb (i32.shl (local.get $N) (i32.const 2)))
    (local.set $acc (f32.const 0))
    (if (local.get $bias)
      (then (local.set $acc (f32.load (i32.add (local.get $bias) (i32.shl (local.get $j) (i32.const 2)))))))
    (block $done
      (loop $k_loop
        (br_if $done (i32.ge_u (local.get $k) (local.get $K)))
        (local.set $acc (f32.add (local.get $acc) (f32.mul (f32.load (local.get $pa)) (f32.load (local.get $pb)))))
        (local.set $pa (i32.add (local.get $pa) (local.get $sa)))
        (local.set $pb (i32.add (local.get $pb) (local.get $sb)))
        (local.set $k (i32.add (local.get $k) (i32.const 1)))
        (br $k_loop)))
    (local.get $acc))

  ;; C[M,N] = Aᵀ·B for A [K,M] and B [K,N], all row-major float32.
  (func (export "mm_tn") (param $a i32) (param $b i32) (param $c i32) (param $K i32) (param $M i32) (param $N i32)
    (call $mm (local.get $a) (local.get $b) (local.get $c) (local.get $K) (local.get $M) (local.get $N) (i32.const 1) (local.get $M) (i32.const 0) (i32.const 0)))

  ;; C[M,N] = act(bias + A·B) for A [M,K] and B [K,N], all row-major float32;
  ;; bias [N] at $bias, or none when $bias is 0; $relu = 1 clamps at 0 the way
  ;; the backend's fused relu does (max(0, x) with a NaN going to 0).
  (func (export "mm_nn") (param $a i32) (param $b i32) (param $c i32) (param $K i32) (param $M i32) (param $N i32) (param $bias i32) (param $relu i32)
    (call $mm (local.get $a) (local.get $b) (local.get $c) (local.get $K) (local.get $M) (local.get $N) (local.get $K) (i32.const 1) (local.get $bias) (local.get $relu)))

  ;; C[M,N] = A·B for A(i, k) at a + 4·(i·rs + k·ks) and B [K,N] row-major, from 0 in k order: one
  ;; k-block of a product at a time (the stock scalar matmul's 48-wide blocks, see kernels-process.ts).
  (func (export "mm_strided") (param $a i32) (param $b i32) (param $c i32) (param $K i32) (param $M i32) (param $N i32) (param $rs i32) (param $ks i32)
    (call $mm (local.get $a) (local.get $b) (local.get $c) (local.get $K) (local.get $M) (local.get $N) (local.get $rs) (local.get $ks) (i32.const 0) (i32.const 0)))

  ;; C[M,N] = A·B with A(i, k) at a + 4·(i·rs + k·ks). Blocks of 4 rows x 8
  ;; columns keep 8 accumulators in registers.
  (func $mm (param $a i32) (param $b i32) (param $c i32) (param $K i32) (param $M i32) (param $N i32) (param $rs i32) (param $ks i32) (param $bias i32) (param $relu i32)
    (local $pa1 i32) (local $zero v128) (local $bias0 v128) (local $bias1 v128) (local $v f32) (local $pa2 i32) (local $pa3 i32) (local $rsb i32)
    (local $i i32) (local $j i32) (local $k i32) (local $r i32)
    (local $pa i32) (local $pb i32) (local $pc i32) (local $sa i32) (local $sb i32) (local $sc i32)
    (local $M4 i32) (local $N8 i32)
    (local $b0 v128) (local $b1 v128) (local $x v128)
    (local $c00 v128) (local $c01 v128) (local $c10 v128) (local $c11 v128)
    (local $c20 v128) (local $c21 v128) (local $c30 v128) (local $c31 v128)
    (local.set $sa (i32.shl (local.get $ks) (i32.const 2)))
    (local.set $rsb (i32.shl (local.get $rs) (i32.const 2)))
    (local.set $sb (i32.shl (local.get $N) (i32.const 2)))
    (local.set $sc (i32.shl (local.get $N) (i32.const 2)))
    (local.set $M4 (i32.and (local.get $M) (i32.const -4)))
    (local.set $N8 (i32.and (local.get $N) (i32.const -8)))
    ;; full 4 x 8 blocks
    (local.set $i (i32.const 0))
    (block $i_done
      (loop $i_loop
        (br_if $i_done (i32.ge_u (local.get $i) (local.get $M4)))
        (local.set $j (i32.const 0))
        (block $j_done
          (loop $j_loop
            (br_if $j_done (i32.ge_u (local.get $j) (local.get $N8)))
            (local.set $bias0 (v128.const f32x4 0 0 0 0))
            (local.set $bias1 (v128.const f32x4 0 0 0 0))
            (if (local.get $bias)
              (then
                (local.set $bias0 (v128.load (i32.add (local.get $bias) (i32.shl (local.get $j) (i32.const 2)))))
                (local.set $bias1 (v128.load offset=16 (i32.add (local.get $bias) (i32.shl (local.get $j) (i32.const 2)))))))
            (local.set $c00 (local.get $bias0)) (local.set $c01 (local.get $bias1))
            (local.set $c10 (local.get $bias0)) (local.set $c11 (local.get $bias1))
            (local.set $c20 (local.get $bias0)) (local.set $c21 (local.get $bias1))
            (local.set $c30 (local.get $bias0)) (local.set $c31 (local.get $bias1))
            (local.set $pa (i32.add (local.get $a) (i32.mul (local.get $i) (local.get $rsb))))
            (local.set $pa1 (i32.add (local.get $pa) (local.get $rsb)))
            (local.set $pa2 (i32.add (local.get $pa1) (local.get $rsb)))
            (local.set $pa3 (i32.add (local.get $pa2) (local.get $rsb)))
            (local.set $pb (i32.add (local.get $b) (i32.shl (local.get $j) (i32.const 2))))
            (local.set $k (i32.const 0))
            (block $k_done
              (loop $k_loop
                (br_if $k_done (i32.ge_u (local.get $k) (local.get $K)))
                (local.set $b0 (v128.load (local.get $pb)))
                (local.set $b1 (v128.load offset=16 (local.get $pb)))
                (local.set $x (v128.load32_splat (local.get $pa)))
                (local.set $c00 (f32x4.add (local.get $c00) (f32x4.mul (local.get $x) (local.get $b0))))
                (local.set $c01 (f32x4.add (local.get $c01) (f32x4.mul (local.get $x) (local.get $b1))))
                (local.set $x (v128.load32_splat (local.get $pa1)))
                (local.set $c10 (f32x4.add (local.get $c10) (f32x4.mul (local.get $x) (local.get $b0))))
                (local.set $c11 (f32x4.add (local.get $c11) (f32x4.mul (local.get $x) (local.get $b1))))
                (local.set $x (v128.load32_splat (local.get $pa2)))
                (local.set $c20 (f32x4.add (local.get $c20) (f32x4.mul (local.get $x) (local.get $b0))))
                (local.set $c21 (f32x4.add (local.get $c21) (f32x4.mul (local.get $x) (local.get $b1))))
                (local.set $x (v128.load32_splat (local.get $pa3)))
                (local.set $c30 (f32x4.add (local.get $c30) (f32x4.mul (local.get $x) (local.get $b0))))
                (local.set $c31 (f32x4.add (local.get $c31) (f32x4.mul (local.get $x) (local.get $b1))))
                (local.set $pa (i32.add (local.get $pa) (local.get $sa)))
                (local.set $pa1 (i32.add (local.get $pa1) (local.get $sa)))
                (local.set $pa2 (i32.add (local.get $pa2) (local.get $sa)))
                (local.set $pa3 (i32.add (local.get $pa3) (local.get $sa)))
                (local.set $pb (i32.add (local.get $pb) (local.get $sb)))
                (local.set $k (i32.add (local.get $k) (i32.const 1)))
                (br $k_loop)))
            (if (local.get $relu)
              (then
                (local.set $c00 (f32x4.pmax (local.get $zero) (local.get $c00))) (local.set $c01 (f32x4.pmax (local.get $zero) (local.get $c01)))
                (local.set $c10 (f32x4.pmax (local.get $zero) (local.get $c10))) (local.set $c11 (f32x4.pmax (local.get $zero) (local.get $c11)))
                (local.set $c20 (f32x4.pmax (local.get $zero) (local.get $c20))) (local.set $c21 (f32x4.pmax (local.get $zero) (local.get $c21)))
                (local.set $c30 (f32x4.pmax (local.get $zero) (local.get $c30))) (local.set $c31 (f32x4.pmax (local.get $zero) (local.get $c31)))))
            (local.set $pc (i32.add (local.get $c)
              (i32.shl (i32.add (i32.mul (local.get $i) (local.get $N)) (local.get $j)) (i32.const 2))))
            (v128.store (local.get $pc) (local.get $c00))
            (v128.store offset=16 (local.get $pc) (local.get $c01))
            (local.set $pc (i32.add (local.get $pc) (local.get $sc)))
            (v128.store (local.get $pc) (local.get $c10))
            (v128.store offset=16 (local.get $pc) (local.get $c11))
            (local.set $pc (i32.add (local.get $pc) (local.get $sc)))
            (v128.store (local.get $pc) (local.get $c20))
            (v128.store offset=16 (local.get $pc) (local.get $c21))
            (local.set $pc (i32.add (local.get $pc) (local.get $sc)))
            (v128.store (local.get $pc) (local.get $c30))
            (v128.store offset=16 (local.get $pc) (local.get $c31))
            (local.set $j (i32.add (local.get $j) (i32.const 8)))
            (br $j_loop)))
        (local.set $i (i32.add (local.get $i) (i32.const 4)))
        (br $i_loop)))
    ;; leftover columns (j >= N8) for the blocked rows, and all columns of leftover rows
    (local.set $i (i32.const 0))
    (block $ri_done
      (loop $ri_loop
        (br_if $ri_done (i32.ge_u (local.get $i) (local.get $M)))
        (local.set $j (select (local.get $N8) (i32.const 0) (i32.lt_u (local.get $i) (local.get $M4))))
        (block $rj_done
          (loop $rj_loop
            (br_if $rj_done (i32.ge_u (local.get $j) (local.get $N)))
            (local.set $v (call $dot (local.get $a) (local.get $b) (local.get $K) (local.get $rs) (local.get $ks) (local.get $N) (local.get $i) (local.get $j) (local.get $bias)))
            ;; pmax(0, v) = 0 < v ? v : 0, so a NaN goes to 0 here too
            (if (local.get $relu)
              (then (local.set $v (select (local.get $v) (f32.const 0) (f32.lt (f32.const 0) (local.get $v))))))
            (f32.store
              (i32.add (local.get $c) (i32.shl (i32.add (i32.mul (local.get $i) (local.get $N)) (local.get $j)) (i32.const 2)))
              (local.get $v))
            (local.set $j (i32.add (local.get $j) (i32.const 1)))
            (br $rj_loop)))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $ri_loop)))
  )

  ;; out[e, c] = p[src[e], c] + p[dst[e], H + c] + b[e, c] for p [nodes, 2H].
  (func (export "gather_pair_add") (param $p i32) (param $src i32) (param $dst i32) (param $b i32) (param $out i32) (param $E i32) (param $H i32)
    (local $e i32) (local $c i32) (local $ps i32) (local $pd i32) (local $pb i32) (local $po i32) (local $H4 i32)
    (local $x v128) (local $y v128) (local $z v128) (local $lo v128) (local $hi v128)
    (local.set $H4 (i32.and (local.get $H) (i32.const -4)))
    (local.set $pb (local.get $b))
    (local.set $po (local.get $out))
    (block $e_done
      (loop $e_loop
        (br_if $e_done (i32.ge_u (local.get $e) (local.get $E)))
        (local.set $ps (i32.add (local.get $p)
          (i32.shl (i32.mul (i32.load (i32.add (local.get $src) (i32.shl (local.get $e) (i32.const 2)))) (local.get $H)) (i32.const 3))))
        (local.set $pd (i32.add (i32.add (local.get $p) (i32.shl (local.get $H) (i32.const 2)))
          (i32.shl (i32.mul (i32.load (i32.add (local.get $dst) (i32.shl (local.get $e) (i32.const 2)))) (local.get $H)) (i32.const 3))))
        (local.set $c (i32.const 0))
        (block $c_done
          (loop $c_loop
            (br_if $c_done (i32.ge_u (local.get $c) (local.get $H4)))
            (local.set $x (v128.load (local.get $ps)))
            (local.set $y (v128.load (local.get $pd)))
            (local.set $z (v128.load (local.get $pb)))
            (local.set $lo (f32x4.demote_f64x2_zero
              (f64x2.add (f64x2.add (f64x2.promote_low_f32x4 (local.get $x)) (f64x2.promote_low_f32x4 (local.get $y)))
                         (f64x2.promote_low_f32x4 (local.get $z)))))
            (local.set $x (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $x) (local.get $x)))
            (local.set $y (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $y) (local.get $y)))
            (local.set $z (i8x16.shuffle 8 9 10 11 12 13 14 15 0 1 2 3 4 5 6 7 (local.get $z) (local.get $z)))
            (local.set $hi (f32x4.demote_f64x2_zero
              (f64x2.add (f64x2.add (f64x2.promote_low_f32x4 (local.get $x)) (f64x2.promote_low_f32x4 (local.get $y)))
                         (f64x2.promote_low_f32x4 (local.get $z)))))
            (v128.store (local.get $po) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $lo) (local.get $hi)))
            (local.set $ps (i32.add (local.get $ps) (i32.const 16)))
            (local.set $pd (i32.add (local.get $pd) (i32.const 16)))
            (local.set $pb (i32.add (local.get $pb) (i32.const 16)))
            (local.set $po (i32.add (local.get $po) (i32.const 16)))
            (local.set $c (i32.add (local.get $c) (i32.const 4)))
            (br $c_loop)))
        (block $t_done
          (loop $t_loop
            (br_if $t_done (i32.ge_u (local.get $c) (local.get $H)))
            (f32.store (local.get $po) (f32.demote_f64
              (f64.add (f64.add (f64.promote_f32 (f32.load (local.get $ps))) (f64.promote_f32 (f32.load (local.get $pd))))
                       (f64.promote_f32 (f32.load (local.get $pb))))))
            (local.set $ps (i32.add (local.get $ps) (i32.const 4)))
            (local.set $pd (i32.add (local.get $pd) (i32.const 4)))
            (local.set $pb (i32.add (local.get $pb) (i32.const 4)))
            (local.set $po (i32.add (local.get $po) (i32.const 4)))
            (local.set $c (i32.add (local.get $c) (i32.const 1)))
            (br $t_loop)))
        (local.set $e (i32.add (local.get $e) (i32.const 1)))
        (br $e_loop))))

  ;; Zero n float32 values at $ptr.
  (func $zero (param $ptr i32) (param $n i32)
    (local $end i32) (local $end4 i32)
    (local.set $end (i32.add (local.get $ptr) (i32.shl (local.get $n) (i32.const 2))))
    (local.set $end4 (i32.add (local.get $ptr) (i32.shl (i32.and (local.get $n) (i32.const -4)) (i32.const 2))))
    (block $done
      (loop $l
        (br_if $done (i32.ge_u (local.get $ptr) (local.get $end4)))
        (v128.store (local.get $ptr) (v128.const i32x4 0 0 0 0))
        (local.set $ptr (i32.add (local.get $ptr) (i32.const 16)))
        (br $l)))
    (block $done2
      (loop $l2
        (br_if $done2 (i32.ge_u (local.get $ptr) (local.get $end)))
        (f32.store (local.get $ptr) (f32.const 0))
        (local.set $ptr (i32.add (local.get $ptr) (i32.const 4)))
        (br $l2))))

  ;; out [nodes, 2H] = 0; then out[src[e], c] += dy[e, c] and out[dst[e], H + c] += dy[e, c], edges in order.
  (func (export "scatter_pair") (param $dy i32) (param $src i32) (param $dst i32) (param $out i32) (param $nodes i32) (param $E i32) (param $H i32)
    (local $e i32) (local $c i32) (local $ps i32) (local $pd i32) (local $pg i32) (local $H4 i32) (local $g v128) (local $gs f32)
    (call $zero (local.get $out) (i32.mul (local.get $nodes) (i32.shl (local.get $H) (i32.const 1))))
    (local.set $H4 (i32.and (local.get $H) (i32.const -4)))
    (local.set $pg (local.get $dy))
    (block $e_done
      (loop $e_loop
        (br_if $e_done (i32.ge_u (local.get $e) (local.get $E)))
        (local.set $ps (i32.add (local.get $out)
          (i32.shl (i32.mul (i32.load (i32.add (local.get $src) (i32.shl (local.get $e) (i32.const 2)))) (local.get $H)) (i32.const 3))))
        (local.set $pd (i32.add (i32.add (local.get $out) (i32.shl (local.get $H) (i32.const 2)))
          (i32.shl (i32.mul (i32.load (i32.add (local.get $dst) (i32.shl (local.get $e) (i32.const 2)))) (local.get $H)) (i32.const 3))))
        (local.set $c (i32.const 0))
        (block $c_done
          (loop $c_loop
            (br_if $c_done (i32.ge_u (local.get $c) (local.get $H4)))
            (local.set $g (v128.load (local.get $pg)))
            (v128.store (local.get $ps) (f32x4.add (v128.load (local.get $ps)) (local.get $g)))
            (v128.store (local.get $pd) (f32x4.add (v128.load (local.get $pd)) (local.get $g)))
            (local.set $ps (i32.add (local.get $ps) (i32.const 16)))
            (local.set $pd (i32.add (local.get $pd) (i32.const 16)))
            (local.set $pg (i32.add (local.get $pg) (i32.const 16)))
            (local.set $c (i32.add (local.get $c) (i32.const 4)))
            (br $c_loop)))
        (block $t_done
          (loop $t_loop
            (br_if $t_done (i32.ge_u (local.get $c) (local.get $H)))
            (local.set $gs (f32.load (local.get $pg)))
            (f32.store (local.get $ps) (f32.add (f32.load (local.get $ps)) (local.get $gs)))
            (f32.store (local.get $pd) (f32.add (f32.load (local.get $pd)) (local.get $gs)))
            (local.set $ps (i32.add (local.get $ps) (i32.const 4)))
            (local.set $pd (i32.add (local.get $pd) (i32.const 4)))
            (local.set $pg (i32.add (local.get $pg) (i32.const 4)))
            (local.set $c (i32.add (local.get $c) (i32.const 1)))
            (br $t_loop)))
        (local.set $e (i32.add (local.get $e) (i32.const 1)))
        (br $e_loop))))

  ;; out [rows, C] = 0; then out[arg[o], o mod C] += dy[o] for every o with arg[o] >= 0, in order.
  (func (export "scatter_by_arg") (param $dy i32) (param $arg i32) (param $out i32) (param $rows i32) (param $n i32) (param $C i32)
    (local $o i32) (local $c i32) (local $a i32) (local $q i32)
    (call $zero (local.get $out) (i32.mul (local.get $rows) (local.get $C)))
    (block $done
      (loop $l
        (br_if $done (i32.ge_u (local.get $o) (local.get $n)))
        (local.set $a (i32.load (i32.add (local.get $arg) (i32.shl (local.get $o) (i32.const 2)))))
        (if (i32.ge_s (local.get $a) (i32.const 0))
          (then
            (local.set $q (i32.add (local.get $out) (i32.shl (i32.add (i32.mul (local.get $a) (local.get $C)) (local.get $c)) (i32.const 2))))
            (f32.store (local.get $q) (f32.add (f32.load (local.get $q))
              (f32.load (i32.add (local.get $dy) (i32.shl (local.get $o) (i32.const 2))))))))
        (local.set $c (i32.add (local.get $c) (i32.const 1)))
        (if (i32.eq (local.get $c) (local.get $C)) (then (local.set $c (i32.const 0))))
        (local.set $o (i32.add (local.get $o) (i32.const 1)))
        (br $l))))

  ;; Per segment and channel max ($isMax = 1) or min of x [E, C] over ids; vals/arg [S, C].
  ;; The first edge of a segment fills its row; a later edge wins a channel only if
  ;; strictly better, or if it is NaN and the current value is not. Empty segments: 0 and -1.
  (func (export "segment_extreme") (param $x i32) (param $ids i32) (param $vals i32) (param $arg i32) (param $E i32) (param $C i32) (param $S i32) (param $isMax i32)
    (local $e i32) (local $c i32) (local $C4 i32) (local $px i32) (local $pv i32) (local $pa i32) (local $n i32)
    (local $v v128) (local $best v128) (local $better v128) (local $ev v128)
    (local $vs f32) (local $bs f32) (local $win i32)
    (local.set $n (i32.mul (local.get $S) (local.get $C)))
    (call $zero (local.get $vals) (local.get $n))
    ;; arg = -1 everywhere; arg[s, 0] >= 0 then marks a segment already seen
    (local.set $pa (local.get $arg))
    (local.set $c (i32.const 0))
    (block $f_done
      (loop $f
        (br_if $f_done (i32.ge_u (local.get $c) (local.get $n)))
        (i32.store (local.get $pa) (i32.const -1))
        (local.set $pa (i32.add (local.get $pa) (i32.const 4)))
        (local.set $c (i32.add (local.get $c) (i32.const 1)))
        (br $f)))
    (local.set $C4 (i32.and (local.get $C) (i32.const -4)))
    (local.set $px (local.get $x))
    (block $e_done
      (loop $e_loop
        (br_if $e_done (i32.ge_u (local.get $e) (local.get $E)))
        (local.set $pv (i32.shl (i32.mul (i32.load (i32.add (local.get $ids) (i32.shl (local.get $e) (i32.const 2)))) (local.get $C)) (i32.const 2)))
        (local.set $pa (i32.add (local.get $arg) (local.get $pv)))
        (local.set $pv (i32.add (local.get $vals) (local.get $pv)))
        (local.set $ev (i32x4.splat (local.get $e)))
        (if (i32.lt_s (i32.load (local.get $pa)) (i32.const 0))
          (then
            ;; first edge of this segment
            (local.set $c (i32.const 0))
            (block $w_done
              (loop $w
                (br_if $w_done (i32.ge_u (local.get $c) (local.get $C)))
                (f32.store (local.get $pv) (f32.load (local.get $px)))
                (i32.store (local.get $pa) (local.get $e))
                (local.set $px (i32.add (local.get $px) (i32.const 4)))
                (local.set $pv (i32.add (local.get $pv) (i32.const 4)))
                (local.set $pa (i32.add (local.get $pa) (i32.const 4)))
                (local.set $c (i32.add (local.get $c) (i32.const 1)))
                (br $w))))
          (else
            (local.set $c (i32.const 0))
            (block $c_done
              (loop $c_loop
                (br_if $c_done (i32.ge_u (local.get $c) (local.get $C4)))
                (local.set $v (v128.load (local.get $px)))
                (local.set $best (v128.load (local.get $pv)))
                (local.set $better (v128.or
                  (select (f32x4.gt (local.get $v) (local.get $best)) (f32x4.lt (local.get $v) (local.get $best)) (local.get $isMax))
                  (v128.and (f32x4.ne (local.get $v) (local.get $v)) (f32x4.eq (local.get $best) (local.get $best)))))
                (v128.store (local.get $pv) (v128.bitselect (local.get $v) (local.get $best) (local.get $better)))
                (v128.store (local.get $pa) (v128.bitselect (local.get $ev) (v128.load (local.get $pa)) (local.get $better)))
                (local.set $px (i32.add (local.get $px) (i32.const 16)))
                (local.set $pv (i32.add (local.get $pv) (i32.const 16)))
                (local.set $pa (i32.add (local.get $pa) (i32.const 16)))
                (local.set $c (i32.add (local.get $c) (i32.const 4)))
                (br $c_loop)))
            (block $t_done
              (loop $t_loop
                (br_if $t_done (i32.ge_u (local.get $c) (local.get $C)))
                (local.set $vs (f32.load (local.get $px)))
                (local.set $bs (f32.load (local.get $pv)))
                (local.set $win (i32.or
                  (select (f32.gt (local.get $vs) (local.get $bs)) (f32.lt (local.get $vs) (local.get $bs)) (local.get $isMax))
                  (i32.and (f32.ne (local.get $vs) (local.get $vs)) (f32.eq (local.get $bs) (local.get $bs)))))
                (if (local.get $win)
                  (then
                    (f32.store (local.get $pv) (local.get $vs))
                    (i32.store (local.get $pa) (local.get $e))))
                (local.set $px (i32.add (local.get $px) (i32.const 4)))
                (local.set $pv (i32.add (local.get $pv) (i32.const 4)))
                (local.set $pa (i32.add (local.get $pa) (i32.const 4)))
                (local.set $c (i32.add (local.get $c) (i32.const 1)))
                (br $t_loop)))))
        (local.set $e (i32.add (local.get $e) (i32.const 1)))
        (br $e_loop))))

  ;; rows x width 4-byte values from src (row stride srcStride) to dst (row stride dstStride), in elements.
  (func (export "copy_block") (param $src i32) (param $dst i32) (param $rows i32) (param $width i32) (param $srcStride i32) (param $dstStride i32)
    (local $r i32) (local $c i32) (local $ps i32) (local $pd i32) (local $W4 i32)
    (local.set $W4 (i32.and (local.get $width) (i32.const -4)))
    (block $r_done
      (loop $r_loop
        (br_if $r_done (i32.ge_u (local.get $r) (local.get $rows)))
        (local.set $ps (i32.add (local.get $src) (i32.shl (i32.mul (local.get $r) (local.get $srcStride)) (i32.const 2))))
        (local.set $pd (i32.add (local.get $dst) (i32.shl (i32.mul (local.get $r) (local.get $dstStride)) (i32.const 2))))
        (local.set $c (i32.const 0))
        (block $c_done
          (loop $c_loop
            (br_if $c_done (i32.ge_u (local.get $c) (local.get $W4)))
            (v128.store (local.get $pd) (v128.load (local.get $ps)))
            (local.set $ps (i32.add (local.get $ps) (i32.const 16)))
            (local.set $pd (i32.add (local.get $pd) (i32.const 16)))
            (local.set $c (i32.add (local.get $c) (i32.const 4)))
            (br $c_loop)))
        (block $t_done
          (loop $t_loop
            (br_if $t_done (i32.ge_u (local.get $c) (local.get $width)))
            (i32.store (local.get $pd) (i32.load (local.get $ps)))
            (local.set $ps (i32.add (local.get $ps) (i32.const 4)))
            (local.set $pd (i32.add (local.get $pd) (i32.const 4)))
            (local.set $c (i32.add (local.get $c) (i32.const 1)))
            (br $t_loop)))
        (local.set $r (i32.add (local.get $r) (i32.const 1)))
        (br $r_loop))))

  ;; out[c] = sum over rows r of x[r, c] for x [rows, cols], rows in order, from 0.
  (func (export "col_sum") (param $x i32) (param $out i32) (param $rows i32) (param $cols i32)
    (local $r i32) (local $c i32) (local $p i32) (local $stride i32) (local $acc v128) (local $accs f32) (local $C4 i32)
    (local.set $stride (i32.shl (local.get $cols) (i32.const 2)))
    (local.set $C4 (i32.and (local.get $cols) (i32.const -4)))
    (block $c_done
      (loop $c_loop
        (br_if $c_done (i32.ge_u (local.get $c) (local.get $C4)))
        (local.set $acc (v128.const f32x4 0 0 0 0))
        (local.set $p (i32.add (local.get $x) (i32.shl (local.get $c) (i32.const 2))))
        (local.set $r (i32.const 0))
        (block $r_done
          (loop $r_loop
            (br_if $r_done (i32.ge_u (local.get $r) (local.get $rows)))
            (local.set $acc (f32x4.add (local.get $acc) (v128.load (local.get $p))))
            (local.set $p (i32.add (local.get $p) (local.get $stride)))
            (local.set $r (i32.add (local.get $r) (i32.const 1)))
            (br $r_loop)))
        (v128.store (i32.add (local.get $out) (i32.shl (local.get $c) (i32.const 2))) (local.get $acc))
        (local.set $c (i32.add (local.get $c) (i32.const 4)))
        (br $c_loop)))
    (block $t_done
      (loop $t_loop
        (br_if $t_done (i32.ge_u (local.get $c) (local.get $cols)))
        (local.set $accs (f32.const 0))
        (local.set $p (i32.add (local.get $x) (i32.shl (local.get $c) (i32.const 2))))
        (local.set $r (i32.const 0))
        (block $r2_done
          (loop $r2_loop
            (br_if $r2_done (i32.ge_u (local.get $r) (local.get $rows)))
            (local.set $accs (f32.add (local.get $accs) (f32.load (local.get $p))))
            (local.set $p (i32.add (local.get $p) (local.get $stride)))
            (local.set $r (i32.add (local.get $r) (i32.const 1)))
            (br $r2_loop)))
        (f32.store (i32.add (local.get $out) (i32.shl (local.get $c) (i32.const 2))) (local.get $accs))
        (local.set $c (i32.add (local.get $c) (i32.const 1)))
        (br $t_loop))))

  ;; One Adam step for n values, each float32 op in the order tfjs's Adam applies it:
  ;;   g  = gRaw·scale
  ;;   m' = m·b1 + g·c1            v' = v·b2 + (g·g)·c2
  ;;   value' = ((m'/o1) / (sqrt(v'/o2) + eps))·nlr + value
  ;; writing value', m', v' to fresh outputs (inputs are not modified).
  (func (export "adam_step")
    (param $value i32) (param $grad i32) (param $m i32) (param $v i32)
    (param $outValue i32) (param $outM i32) (param $outV i32) (param $n i32)
    (param $scale f32) (param $b1 f32) (param $c1 f32) (param $b2 f32) (param $c2 f32)
    (param $o1 f32) (param $o2 f32) (param $eps f32) (param $nlr f32)
    (local $i i32) (local $n4 i32) (local $off i32)
    (local $g v128) (local $m2 v128) (local $v2 v128)
    (local $gs f32) (local $ms f32) (local $vs f32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (block $done
      (loop $l
        (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
        (local.set $off (i32.shl (local.get $i) (i32.const 2)))
        (local.set $g (f32x4.mul (v128.load (i32.add (local.get $grad) (local.get $off))) (f32x4.splat (local.get $scale))))
        (local.set $m2 (f32x4.add
          (f32x4.mul (v128.load (i32.add (local.get $m) (local.get $off))) (f32x4.splat (local.get $b1)))
          (f32x4.mul (local.get $g) (f32x4.splat (local.get $c1)))))
        (local.set $v2 (f32x4.add
          (f32x4.mul (v128.load (i32.add (local.get $v) (local.get $off))) (f32x4.splat (local.get $b2)))
          (f32x4.mul (f32x4.mul (local.get $g) (local.get $g)) (f32x4.splat (local.get $c2)))))
        (v128.store (i32.add (local.get $outM) (local.get $off)) (local.get $m2))
        (v128.store (i32.add (local.get $outV) (local.get $off)) (local.get $v2))
        (v128.store (i32.add (local.get $outValue) (local.get $off))
          (f32x4.add
            (f32x4.mul
              (f32x4.div
                (f32x4.div (local.get $m2) (f32x4.splat (local.get $o1)))
                (f32x4.add (f32x4.sqrt (f32x4.div (local.get $v2) (f32x4.splat (local.get $o2)))) (f32x4.splat (local.get $eps))))
              (f32x4.splat (local.get $nlr)))
            (v128.load (i32.add (local.get $value) (local.get $off)))))
        (local.set $i (i32.add (local.get $i) (i32.const 4)))
        (br $l)))
    (block $t_done
      (loop $t
        (br_if $t_done (i32.ge_u (local.get $i) (local.get $n)))
        (local.set $off (i32.shl (local.get $i) (i32.const 2)))
        (local.set $gs (f32.mul (f32.load (i32.add (local.get $grad) (local.get $off))) (local.get $scale)))
        (local.set $ms (f32.add
          (f32.mul (f32.load (i32.add (local.get $m) (local.get $off))) (local.get $b1))
          (f32.mul (local.get $gs) (local.get $c1))))
        (local.set $vs (f32.add
          (f32.mul (f32.load (i32.add (local.get $v) (local.get $off))) (local.get $b2))
          (f32.mul (f32.mul (local.get $gs) (local.get $gs)) (local.get $c2))))
        (f32.store (i32.add (local.get $outM) (local.get $off)) (local.get $ms))
        (f32.store (i32.add (local.get $outV) (local.get $off)) (local.get $vs))
        (f32.store (i32.add (local.get $outValue) (local.get $off))
          (f32.add
            (f32.mul
              (f32.div
                (f32.div (local.get $ms) (local.get $o1))
                (f32.add (f32.sqrt (f32.div (local.get $vs) (local.get $o2))) (local.get $eps)))
              (local.get $nlr))
            (f32.load (i32.add (local.get $value) (local.get $off)))))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $t))))

  ;; Sum of x[i]·x[i] over n values, in order, from 0.
  (func (export "sum_squares") (param $x i32) (param $n i32) (result f32)
    (local $acc f32) (local $i i32) (local $v f32)
    (block $done
      (loop $l
        (br_if $done (i32.ge_u (local.get $i) (local.get $n)))
        (local.set $v (f32.load (i32.add (local.get $x) (i32.shl (local.get $i) (i32.const 2)))))
        (local.set $acc (f32.add (local.get $acc) (f32.mul (local.get $v) (local.get $v))))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $l)))
    (local.get $acc))

  ;; out[i0,i1,i2] = a[i0·as0 + i1·as1 + i2·as2] == b[…] ? 1 : 0 (float32 in, one byte out;
  ;; strides in elements, 0 along broadcast axes).
  (func (export "equal3") (param $a i32) (param $b i32) (param $out i32)
    (param $d0 i32) (param $d1 i32) (param $d2 i32)
    (param $as0 i32) (param $as1 i32) (param $as2 i32) (param $bs0 i32) (param $bs1 i32) (param $bs2 i32)
    (local $i0 i32) (local $i1 i32) (local $i2 i32) (local $pa0 i32) (local $pb0 i32) (local $pa1 i32) (local $pb1 i32)
    (local $pa i32) (local $pb i32) (local $po i32)
    (local.set $as0 (i32.shl (local.get $as0) (i32.const 2))) (local.set $as1 (i32.shl (local.get $as1) (i32.const 2)))
    (local.set $as2 (i32.shl (local.get $as2) (i32.const 2))) (local.set $bs0 (i32.shl (local.get $bs0) (i32.const 2)))
    (local.set $bs1 (i32.shl (local.get $bs1) (i32.const 2))) (local.set $bs2 (i32.shl (local.get $bs2) (i32.const 2)))
    (local.set $po (local.get $out))
    (local.set $pa0 (local.get $a))
    (local.set $pb0 (local.get $b))
    (block $d0_done
      (loop $l0
        (br_if $d0_done (i32.ge_u (local.get $i0) (local.get $d0)))
        (local.set $pa1 (local.get $pa0))
        (local.set $pb1 (local.get $pb0))
        (local.set $i1 (i32.const 0))
        (block $d1_done
          (loop $l1
            (br_if $d1_done (i32.ge_u (local.get $i1) (local.get $d1)))
            (local.set $pa (local.get $pa1))
            (local.set $pb (local.get $pb1))
            (local.set $i2 (i32.const 0))
            (block $d2_done
              (loop $l2
                (br_if $d2_done (i32.ge_u (local.get $i2) (local.get $d2)))
                (i32.store8 (local.get $po) (f32.eq (f32.load (local.get $pa)) (f32.load (local.get $pb))))
                (local.set $po (i32.add (local.get $po) (i32.const 1)))
                (local.set $pa (i32.add (local.get $pa) (local.get $as2)))
                (local.set $pb (i32.add (local.get $pb) (local.get $bs2)))
                (local.set $i2 (i32.add (local.get $i2) (i32.const 1)))
                (br $l2)))
            (local.set $pa1 (i32.add (local.get $pa1) (local.get $as1)))
            (local.set $pb1 (i32.add (local.get $pb1) (local.get $bs1)))
            (local.set $i1 (i32.add (local.get $i1) (i32.const 1)))
            (br $l1)))
        (local.set $pa0 (i32.add (local.get $pa0) (local.get $as0)))
        (local.set $pb0 (i32.add (local.get $pb0) (local.get $bs0)))
        (local.set $i0 (i32.add (local.get $i0) (i32.const 1)))
        (br $l0))))
  ;; ---- elementwise rules of the stock kernels, for the fused process kernel ----
  ;; Each loop does 4 lanes at a time, then the tail one by one, with the same
  ;; single float32 operation per element either way.

  ;; out = x > 0 or x is NaN ? x : +0   (the stock Relu: a NaN stays NaN, -0 becomes 0)
  (func (export "relu") (param $x i32) (param $out i32) (param $n i32)
    (local $i i32) (local $n4 i32) (local $v v128) (local $s f32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
      (local.set $v (v128.load (local.get $x)))
      (v128.store (local.get $out) (v128.and (local.get $v)
        (v128.or (f32x4.gt (local.get $v) (v128.const f32x4 0 0 0 0)) (f32x4.ne (local.get $v) (local.get $v)))))
      (local.set $x (i32.add (local.get $x) (i32.const 16))) (local.set $out (i32.add (local.get $out) (i32.const 16)))
      (local.set $i (i32.add (local.get $i) (i32.const 4))) (br $l)))
    (block $done2 (loop $l2
      (br_if $done2 (i32.ge_u (local.get $i) (local.get $n)))
      (local.set $s (f32.load (local.get $x)))
      (f32.store (local.get $out) (select (local.get $s) (f32.const 0)
        (i32.or (f32.gt (local.get $s) (f32.const 0)) (f32.ne (local.get $s) (local.get $s)))))
      (local.set $x (i32.add (local.get $x) (i32.const 4))) (local.set $out (i32.add (local.get $out) (i32.const 4)))
      (local.set $i (i32.add (local.get $i) (i32.const 1))) (br $l2))))

  ;; out = x < 0 ? α·x : x   (the stock LeakyRelu: -0 and NaN pass through)
  (func (export "leaky_relu") (param $x i32) (param $out i32) (param $n i32) (param $alpha f32)
    (local $i i32) (local $n4 i32) (local $v v128) (local $a v128) (local $s f32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (local.set $a (f32x4.splat (local.get $alpha)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
      (local.set $v (v128.load (local.get $x)))
      (v128.store (local.get $out) (v128.bitselect (f32x4.mul (local.get $a) (local.get $v)) (local.get $v)
        (f32x4.lt (local.get $v) (v128.const f32x4 0 0 0 0))))
      (local.set $x (i32.add (local.get $x) (i32.const 16))) (local.set $out (i32.add (local.get $out) (i32.const 16)))
      (local.set $i (i32.add (local.get $i) (i32.const 4))) (br $l)))
    (block $done2 (loop $l2
      (br_if $done2 (i32.ge_u (local.get $i) (local.get $n)))
      (local.set $s (f32.load (local.get $x)))
      (f32.store (local.get $out) (select (f32.mul (local.get $alpha) (local.get $s)) (local.get $s) (f32.lt (local.get $s) (f32.const 0))))
      (local.set $x (i32.add (local.get $x) (i32.const 4))) (local.set $out (i32.add (local.get $out) (i32.const 4)))
      (local.set $i (i32.add (local.get $i) (i32.const 1))) (br $l2))))

  ;; out = dy·step(x): dy where x > 0, NaN where x is NaN, else dy·0 (mul(dy, step(x)) of the Relu gradient)
  (func (export "relu_grad") (param $dy i32) (param $x i32) (param $out i32) (param $n i32)
    (local $i i32) (local $n4 i32) (local $v v128) (local $g v128) (local $s f32) (local $gs f32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
      (local.set $v (v128.load (local.get $x)))
      (local.set $g (v128.load (local.get $dy)))
      (v128.store (local.get $out)
        (v128.bitselect (local.get $v)
          (v128.bitselect (local.get $g) (f32x4.mul (local.get $g) (v128.const f32x4 0 0 0 0)) (f32x4.gt (local.get $v) (v128.const f32x4 0 0 0 0)))
          (f32x4.ne (local.get $v) (local.get $v))))
      (local.set $x (i32.add (local.get $x) (i32.const 16))) (local.set $dy (i32.add (local.get $dy) (i32.const 16)))
      (local.set $out (i32.add (local.get $out) (i32.const 16)))
      (local.set $i (i32.add (local.get $i) (i32.const 4))) (br $l)))
    (block $done2 (loop $l2
      (br_if $done2 (i32.ge_u (local.get $i) (local.get $n)))
      (local.set $s (f32.load (local.get $x)))
      (local.set $gs (f32.load (local.get $dy)))
      (f32.store (local.get $out)
        (select (local.get $s)
          (select (local.get $gs) (f32.mul (local.get $gs) (f32.const 0)) (f32.gt (local.get $s) (f32.const 0)))
          (f32.ne (local.get $s) (local.get $s))))
      (local.set $x (i32.add (local.get $x) (i32.const 4))) (local.set $dy (i32.add (local.get $dy) (i32.const 4)))
      (local.set $out (i32.add (local.get $out) (i32.const 4)))
      (local.set $i (i32.add (local.get $i) (i32.const 1))) (br $l2))))

  ;; out = x > 0 ? dy : dy·α   (where(x > 0, dy, dy·α) of the LeakyRelu gradient)
  (func (export "leaky_grad") (param $dy i32) (param $x i32) (param $out i32) (param $n i32) (param $alpha f32)
    (local $i i32) (local $n4 i32) (local $g v128) (local $a v128) (local $gs f32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (local.set $a (f32x4.splat (local.get $alpha)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
      (local.set $g (v128.load (local.get $dy)))
      (v128.store (local.get $out) (v128.bitselect (local.get $g) (f32x4.mul (local.get $g) (local.get $a))
        (f32x4.gt (v128.load (local.get $x)) (v128.const f32x4 0 0 0 0))))
      (local.set $x (i32.add (local.get $x) (i32.const 16))) (local.set $dy (i32.add (local.get $dy) (i32.const 16)))
      (local.set $out (i32.add (local.get $out) (i32.const 16)))
      (local.set $i (i32.add (local.get $i) (i32.const 4))) (br $l)))
    (block $done2 (loop $l2
      (br_if $done2 (i32.ge_u (local.get $i) (local.get $n)))
      (local.set $gs (f32.load (local.get $dy)))
      (f32.store (local.get $out) (select (local.get $gs) (f32.mul (local.get $gs) (local.get $alpha)) (f32.gt (f32.load (local.get $x)) (f32.const 0))))
      (local.set $x (i32.add (local.get $x) (i32.const 4))) (local.set $dy (i32.add (local.get $dy) (i32.const 4)))
      (local.set $out (i32.add (local.get $out) (i32.const 4)))
      (local.set $i (i32.add (local.get $i) (i32.const 1))) (br $l2))))

  ;; out = a + b elementwise (out may be a or b)
  (func $add_exported (export "add") (param $a i32) (param $b i32) (param $out i32) (param $n i32)
    (local $i i32) (local $n4 i32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
      (v128.store (local.get $out) (f32x4.add (v128.load (local.get $a)) (v128.load (local.get $b))))
      (local.set $a (i32.add (local.get $a) (i32.const 16))) (local.set $b (i32.add (local.get $b) (i32.const 16)))
      (local.set $out (i32.add (local.get $out) (i32.const 16)))
      (local.set $i (i32.add (local.get $i) (i32.const 4))) (br $l)))
    (block $done2 (loop $l2
      (br_if $done2 (i32.ge_u (local.get $i) (local.get $n)))
      (f32.store (local.get $out) (f32.add (f32.load (local.get $a)) (f32.load (local.get $b))))
      (local.set $a (i32.add (local.get $a) (i32.const 4))) (local.set $b (i32.add (local.get $b) (i32.const 4)))
      (local.set $out (i32.add (local.get $out) (i32.const 4)))
      (local.set $i (i32.add (local.get $i) (i32.const 1))) (br $l2))))

  ;; out [S, H] = 0, then out[ids[e], :] += x[e, :] for edges in order (ScatterNd's segment sum)
  (func (export "segment_sum") (param $x i32) (param $ids i32) (param $out i32) (param $E i32) (param $H i32) (param $S i32)
    (local $e i32) (local $row i32) (local $rowBytes i32)
    (local.set $rowBytes (i32.shl (local.get $H) (i32.const 2)))
    (call $zero (local.get $out) (i32.mul (local.get $S) (local.get $H)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $e) (local.get $E)))
      (local.set $row (i32.add (local.get $out) (i32.mul (i32.load (local.get $ids)) (local.get $rowBytes))))
      (call $add_exported (local.get $row) (local.get $x) (local.get $row) (local.get $H))
      (local.set $x (i32.add (local.get $x) (local.get $rowBytes)))
      (local.set $ids (i32.add (local.get $ids) (i32.const 4)))
      (local.set $e (i32.add (local.get $e) (i32.const 1))) (br $l))))

  ;; ---- the smooth aggregators' elementwise steps (src/engine/kernels-process.ts) ----

  ;; out = −x (a sign flip, as Neg)
  (func (export "neg") (param $x i32) (param $out i32) (param $n i32)
    (local $i i32) (local $n4 i32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
      (v128.store (local.get $out) (f32x4.neg (v128.load (local.get $x))))
      (local.set $x (i32.add (local.get $x) (i32.const 16))) (local.set $out (i32.add (local.get $out) (i32.const 16)))
      (local.set $i (i32.add (local.get $i) (i32.const 4))) (br $l)))
    (block $done2 (loop $l2
      (br_if $done2 (i32.ge_u (local.get $i) (local.get $n)))
      (f32.store (local.get $out) (f32.neg (f32.load (local.get $x))))
      (local.set $x (i32.add (local.get $x) (i32.const 4))) (local.set $out (i32.add (local.get $out) (i32.const 4)))
      (local.set $i (i32.add (local.get $i) (i32.const 1))) (br $l2))))

  ;; out[e, c] = (x[e, c] − p[ids[e], c]) / τ: sub(x, gatherRows(p)) then div by the scalar τ
  (func (export "shift_div") (param $x i32) (param $p i32) (param $ids i32) (param $out i32) (param $E i32) (param $H i32) (param $tau f32)
    (local $e i32) (local $c i32) (local $H4 i32) (local $row i32) (local $t v128)
    (local.set $H4 (i32.and (local.get $H) (i32.const -4)))
    (local.set $t (f32x4.splat (local.get $tau)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $e) (local.get $E)))
      (local.set $row (i32.add (local.get $p) (i32.shl (i32.mul (i32.load (local.get $ids)) (local.get $H)) (i32.const 2))))
      (local.set $c (i32.const 0))
      (block $cdone (loop $cl
        (br_if $cdone (i32.ge_u (local.get $c) (local.get $H4)))
        (v128.store (local.get $out) (f32x4.div (f32x4.sub (v128.load (local.get $x)) (v128.load (local.get $row))) (local.get $t)))
        (local.set $x (i32.add (local.get $x) (i32.const 16))) (local.set $row (i32.add (local.get $row) (i32.const 16)))
        (local.set $out (i32.add (local.get $out) (i32.const 16)))
        (local.set $c (i32.add (local.get $c) (i32.const 4))) (br $cl)))
      (block $tdone (loop $tl
        (br_if $tdone (i32.ge_u (local.get $c) (local.get $H)))
        (f32.store (local.get $out) (f32.div (f32.sub (f32.load (local.get $x)) (f32.load (local.get $row))) (local.get $tau)))
        (local.set $x (i32.add (local.get $x) (i32.const 4))) (local.set $row (i32.add (local.get $row) (i32.const 4)))
        (local.set $out (i32.add (local.get $out) (i32.const 4)))
        (local.set $c (i32.add (local.get $c) (i32.const 1))) (br $tl)))
      (local.set $ids (i32.add (local.get $ids) (i32.const 4)))
      (local.set $e (i32.add (local.get $e) (i32.const 1))) (br $l))))

  ;; q = (a·b) / τ; out = q and negOut = −q (the Exp gradient's product, RealDiv's, then Sub's −dy)
  (func (export "mul_div_neg") (param $a i32) (param $b i32) (param $out i32) (param $negOut i32) (param $n i32) (param $tau f32)
    (local $i i32) (local $n4 i32) (local $t v128) (local $q v128) (local $qs f32)
    (local.set $n4 (i32.and (local.get $n) (i32.const -4)))
    (local.set $t (f32x4.splat (local.get $tau)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $i) (local.get $n4)))
      (local.set $q (f32x4.div (f32x4.mul (v128.load (local.get $a)) (v128.load (local.get $b))) (local.get $t)))
      (v128.store (local.get $out) (local.get $q))
      (v128.store (local.get $negOut) (f32x4.neg (local.get $q)))
      (local.set $a (i32.add (local.get $a) (i32.const 16))) (local.set $b (i32.add (local.get $b) (i32.const 16)))
      (local.set $out (i32.add (local.get $out) (i32.const 16))) (local.set $negOut (i32.add (local.get $negOut) (i32.const 16)))
      (local.set $i (i32.add (local.get $i) (i32.const 4))) (br $l)))
    (block $done2 (loop $l2
      (br_if $done2 (i32.ge_u (local.get $i) (local.get $n)))
      (local.set $qs (f32.div (f32.mul (f32.load (local.get $a)) (f32.load (local.get $b))) (local.get $tau)))
      (f32.store (local.get $out) (local.get $qs))
      (f32.store (local.get $negOut) (f32.neg (local.get $qs)))
      (local.set $a (i32.add (local.get $a) (i32.const 4))) (local.set $b (i32.add (local.get $b) (i32.const 4)))
      (local.set $out (i32.add (local.get $out) (i32.const 4))) (local.set $negOut (i32.add (local.get $negOut) (i32.const 4)))
      (local.set $i (i32.add (local.get $i) (i32.const 1))) (br $l2))))

  ;; out[e, :] = x[ids[e], :] (a copy of rows)
  (func (export "gather_rows") (param $x i32) (param $ids i32) (param $out i32) (param $E i32) (param $H i32)
    (local $e i32) (local $rowBytes i32)
    (local.set $rowBytes (i32.shl (local.get $H) (i32.const 2)))
    (block $done (loop $l
      (br_if $done (i32.ge_u (local.get $e) (local.get $E)))
      (memory.copy (local.get $out) (i32.add (local.get $x) (i32.mul (i32.load (local.get $ids)) (local.get $rowBytes))) (local.get $rowBytes))
      (local.set $out (i32.add (local.get $out) (local.get $rowBytes)))
      (local.set $ids (i32.add (local.get $ids) (i32.const 4)))
      (local.set $e (i32.add (local.get $e) (i32.const 1))) (br $l))))

  ;; ---- semiring message layers (kernels-process.ts) ----------------------------------------
  ;; Every [., Hp] block below is padded to Hp = H rounded up to 4 columns, so each row is whole
  ;; vectors; padding lanes carry values nobody reads (each lane is its own float32 sequence).
  ;; h is [N, H], w is W padded to [H, Hp]. The comparisons keep the first of equal values, as the
  ;; stock reductions do (a later v replaces the best only when v < best, or v > best).

  ;; y[n, j] = min_k or max_k (h[n, k] + W[k, j]); y is [N, Hp].
  (func (export "semiring_hard") (param $h i32) (param $w i32) (param $y i32) (param $N i32) (param $H i32) (param $Hp i32) (param $isMin i32)
    (local $n i32) (local $j i32) (local $k i32) (local $hr i32) (local $best v128) (local $v v128) (local $rowB i32)
    (local.set $rowB (i32.shl (local.get $Hp) (i32.const 2)))
    (block $nd (loop $nl
      (br_if $nd (i32.ge_u (local.get $n) (local.get $N)))
      (local.set $hr (i32.add (local.get $h) (i32.shl (i32.mul (local.get $n) (local.get $H)) (i32.const 2))))
      (local.set $j (i32.const 0))
      (block $jd (loop $jl
        (br_if $jd (i32.ge_u (local.get $j) (local.get $Hp)))
        (local.set $best (f32x4.add (v128.load32_splat (local.get $hr)) (v128.load (i32.add (local.get $w) (i32.shl (local.get $j) (i32.const 2))))))
        (local.set $k (i32.const 1))
        (block $kd (loop $kl
          (br_if $kd (i32.ge_u (local.get $k) (local.get $H)))
          (local.set $v (f32x4.add
            (v128.load32_splat (i32.add (local.get $hr) (i32.shl (local.get $k) (i32.const 2))))
            (v128.load (i32.add (local.get $w) (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2)))))))
          (local.set $best (v128.bitselect (local.get $v) (local.get $best)
            (if (result v128) (local.get $isMin) (then (f32x4.lt (local.get $v) (local.get $best))) (else (f32x4.gt (local.get $v) (local.get $best))))))
          (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl)))
        (v128.store (i32.add (local.get $y) (i32.shl (i32.add (i32.mul (local.get $n) (local.get $Hp)) (local.get $j)) (i32.const 2))) (local.get $best))
        (local.set $j (i32.add (local.get $j) (i32.const 4))) (br $jl)))
      (local.set $n (i32.add (local.get $n) (i32.const 1))) (br $nl))))

  ;; Smooth layers before exp: q = (h[n, k] + W[k, j]) / d, peak[n, j] = max_k q ([N, Hp]),
  ;; out[n, k, j] = q − peak ([N, H, Hp]).
  (func (export "semiring_shift") (param $h i32) (param $w i32) (param $peak i32) (param $out i32) (param $N i32) (param $H i32) (param $Hp i32) (param $d f32)
    (local $n i32) (local $j i32) (local $k i32) (local $hr i32) (local $o i32) (local $best v128) (local $v v128) (local $dv v128) (local $rowB i32) (local $hk v128) (local $p i32)
    (local.set $rowB (i32.shl (local.get $Hp) (i32.const 2)))
    (local.set $dv (f32x4.splat (local.get $d)))
    (block $nd (loop $nl
      (br_if $nd (i32.ge_u (local.get $n) (local.get $N)))
      (local.set $hr (i32.add (local.get $h) (i32.shl (i32.mul (local.get $n) (local.get $H)) (i32.const 2))))
      (local.set $o (i32.add (local.get $out) (i32.mul (i32.mul (local.get $n) (local.get $H)) (local.get $rowB))))
      (local.set $k (i32.const 0))
      (block $kd (loop $kl
        (br_if $kd (i32.ge_u (local.get $k) (local.get $H)))
        (local.set $hk (v128.load32_splat (i32.add (local.get $hr) (i32.shl (local.get $k) (i32.const 2)))))
        (local.set $j (i32.const 0))
        (block $jd (loop $jl
          (br_if $jd (i32.ge_u (local.get $j) (local.get $Hp)))
          (local.set $p (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2))))
          (v128.store (i32.add (local.get $o) (local.get $p))
            (f32x4.div (f32x4.add (local.get $hk) (v128.load (i32.add (local.get $w) (local.get $p)))) (local.get $dv)))
          (local.set $j (i32.add (local.get $j) (i32.const 4))) (br $jl)))
        (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl)))
      (local.set $j (i32.const 0))
      (block $jd2 (loop $jl2
        (br_if $jd2 (i32.ge_u (local.get $j) (local.get $Hp)))
        (local.set $best (v128.load (i32.add (local.get $o) (i32.shl (local.get $j) (i32.const 2)))))
        (local.set $k (i32.const 1))
        (block $kd2 (loop $kl2
          (br_if $kd2 (i32.ge_u (local.get $k) (local.get $H)))
          (local.set $v (v128.load (i32.add (local.get $o) (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2))))))
          (local.set $best (v128.bitselect (local.get $v) (local.get $best) (f32x4.gt (local.get $v) (local.get $best))))
          (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl2)))
        (v128.store (i32.add (local.get $peak) (i32.shl (i32.add (i32.mul (local.get $n) (local.get $Hp)) (local.get $j)) (i32.const 2))) (local.get $best))
        (local.set $k (i32.const 0))
        (block $kd3 (loop $kl3
          (br_if $kd3 (i32.ge_u (local.get $k) (local.get $H)))
          (local.set $p (i32.add (local.get $o) (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2)))))
          (v128.store (local.get $p) (f32x4.sub (v128.load (local.get $p)) (local.get $best)))
          (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl3)))
        (local.set $j (i32.add (local.get $j) (i32.const 4))) (br $jl2)))
      (local.set $n (i32.add (local.get $n) (i32.const 1))) (br $nl))))

  ;; Smooth layers between exp and log: c[n, j] = Σ_k b[n, k, j], from 0 in k order.
  (func (export "semiring_totals") (param $b i32) (param $c i32) (param $N i32) (param $H i32) (param $Hp i32)
    (local $n i32) (local $j i32) (local $k i32) (local $bn i32) (local $t v128) (local $rowB i32)
    (local.set $rowB (i32.shl (local.get $Hp) (i32.const 2)))
    (block $nd (loop $nl
      (br_if $nd (i32.ge_u (local.get $n) (local.get $N)))
      (local.set $bn (i32.add (local.get $b) (i32.mul (i32.mul (local.get $n) (local.get $H)) (local.get $rowB))))
      (local.set $j (i32.const 0))
      (block $jd (loop $jl
        (br_if $jd (i32.ge_u (local.get $j) (local.get $Hp)))
        (local.set $t (v128.const i32x4 0 0 0 0))
        (local.set $k (i32.const 0))
        (block $kd (loop $kl
          (br_if $kd (i32.ge_u (local.get $k) (local.get $H)))
          (local.set $t (f32x4.add (local.get $t) (v128.load (i32.add (local.get $bn) (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2)))))))
          (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl)))
        (v128.store (i32.add (local.get $c) (i32.shl (i32.add (i32.mul (local.get $n) (local.get $Hp)) (local.get $j)) (i32.const 2))) (local.get $t))
        (local.set $j (i32.add (local.get $j) (i32.const 4))) (br $jl)))
      (local.set $n (i32.add (local.get $n) (i32.const 1))) (br $nl))))

  ;; dh[n, k] = Σ_j ds[k, j] over the H real columns, from 0 in j order (ds is [H, Hp]).
  (func $row_sums (param $ds i32) (param $dh i32) (param $H i32) (param $Hp i32)
    (local $k i32) (local $j i32) (local $t f32) (local $r i32)
    (block $kd (loop $kl
      (br_if $kd (i32.ge_u (local.get $k) (local.get $H)))
      (local.set $r (i32.add (local.get $ds) (i32.shl (i32.mul (local.get $k) (local.get $Hp)) (i32.const 2))))
      (local.set $t (f32.const 0))
      (local.set $j (i32.const 0))
      (block $jd (loop $jl
        (br_if $jd (i32.ge_u (local.get $j) (local.get $H)))
        (local.set $t (f32.add (local.get $t) (f32.load (i32.add (local.get $r) (i32.shl (local.get $j) (i32.const 2))))))
        (local.set $j (i32.add (local.get $j) (i32.const 1))) (br $jl)))
      (f32.store (i32.add (local.get $dh) (i32.shl (local.get $k) (i32.const 2))) (local.get $t))
      (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl))))

  ;; Hard layers' gradient: ds[n, k, j] = dy[n, j] · (h[n, k] + W[k, j] == y[n, j]) (tfjs sends dy to
  ;; every tied k); dh[n, k] = Σ_j ds (from 0, j order; dh is [N, H]); dw[k, j] = Σ_n ds (from 0, n order;
  ;; [H, Hp]). dy and y are [N, Hp]; ds is scratch [H, Hp].
  (func (export "semiring_hard_grad") (param $h i32) (param $w i32) (param $y i32) (param $dy i32) (param $dh i32) (param $dw i32) (param $ds i32) (param $N i32) (param $H i32) (param $Hp i32)
    (local $n i32) (local $j i32) (local $k i32) (local $hr i32) (local $hk v128) (local $p i32) (local $q i32) (local $share v128) (local $rowB i32)
    (local.set $rowB (i32.shl (local.get $Hp) (i32.const 2)))
    (call $zero (local.get $dw) (i32.mul (local.get $H) (local.get $Hp)))
    (block $nd (loop $nl
      (br_if $nd (i32.ge_u (local.get $n) (local.get $N)))
      (local.set $hr (i32.add (local.get $h) (i32.shl (i32.mul (local.get $n) (local.get $H)) (i32.const 2))))
      (local.set $k (i32.const 0))
      (block $kd (loop $kl
        (br_if $kd (i32.ge_u (local.get $k) (local.get $H)))
        (local.set $hk (v128.load32_splat (i32.add (local.get $hr) (i32.shl (local.get $k) (i32.const 2)))))
        (local.set $j (i32.const 0))
        (block $jd (loop $jl
          (br_if $jd (i32.ge_u (local.get $j) (local.get $Hp)))
          (local.set $p (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2))))
          (local.set $q (i32.shl (i32.add (i32.mul (local.get $n) (local.get $Hp)) (local.get $j)) (i32.const 2)))
          (local.set $share (f32x4.mul (v128.load (i32.add (local.get $dy) (local.get $q)))
            (v128.bitselect (v128.const f32x4 1 1 1 1) (v128.const f32x4 0 0 0 0)
              (f32x4.eq (f32x4.add (local.get $hk) (v128.load (i32.add (local.get $w) (local.get $p)))) (v128.load (i32.add (local.get $y) (local.get $q)))))))
          (v128.store (i32.add (local.get $ds) (local.get $p)) (local.get $share))
          (v128.store (i32.add (local.get $dw) (local.get $p)) (f32x4.add (v128.load (i32.add (local.get $dw) (local.get $p))) (local.get $share)))
          (local.set $j (i32.add (local.get $j) (i32.const 4))) (br $jl)))
        (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl)))
      (call $row_sums (local.get $ds) (i32.add (local.get $dh) (i32.shl (i32.mul (local.get $n) (local.get $H)) (i32.const 2))) (local.get $H) (local.get $Hp))
      (local.set $n (i32.add (local.get $n) (i32.const 1))) (br $nl))))

  ;; Smooth layers' gradient, in the tape's reverse order, per n and column j:
  ;;   dRes = dy·d; dc = dRes / c; dPeak = dRes + −Σ_k (dc·b) (the final add's share, then the shift's);
  ;;   per k: dq = dc·b + dPeak·(q == peak) (the shift's share, then max's); ds = dq / d;
  ;; then dh and dw as the hard layers'. b is [N, H, Hp]; c, peak, dy are [N, Hp]; tmp is 2·Hp + H·Hp.
  (func (export "semiring_smooth_grad") (param $h i32) (param $w i32) (param $peak i32) (param $b i32) (param $c i32) (param $dy i32) (param $dh i32) (param $dw i32) (param $tmp i32) (param $N i32) (param $H i32) (param $Hp i32) (param $d f32)
    (local $n i32) (local $j i32) (local $k i32) (local $hr i32) (local $hk v128) (local $p i32) (local $q i32) (local $rowB i32) (local $bn i32)
    (local $dv v128) (local $dRes v128) (local $dc v128) (local $s v128) (local $ds i32) (local $dPeakAt i32)
    (local.set $rowB (i32.shl (local.get $Hp) (i32.const 2)))
    (local.set $dv (f32x4.splat (local.get $d)))
    (local.set $dPeakAt (i32.add (local.get $tmp) (local.get $rowB)))
    (local.set $ds (i32.add (local.get $dPeakAt) (local.get $rowB)))
    (call $zero (local.get $dw) (i32.mul (local.get $H) (local.get $Hp)))
    (block $nd (loop $nl
      (br_if $nd (i32.ge_u (local.get $n) (local.get $N)))
      (local.set $hr (i32.add (local.get $h) (i32.shl (i32.mul (local.get $n) (local.get $H)) (i32.const 2))))
      (local.set $bn (i32.add (local.get $b) (i32.mul (i32.mul (local.get $n) (local.get $H)) (local.get $rowB))))
      (local.set $j (i32.const 0))
      (block $jd (loop $jl
        (br_if $jd (i32.ge_u (local.get $j) (local.get $Hp)))
        (local.set $q (i32.shl (i32.add (i32.mul (local.get $n) (local.get $Hp)) (local.get $j)) (i32.const 2)))
        (local.set $dRes (f32x4.mul (v128.load (i32.add (local.get $dy) (local.get $q))) (local.get $dv)))
        (local.set $dc (f32x4.div (local.get $dRes) (v128.load (i32.add (local.get $c) (local.get $q)))))
        (local.set $s (v128.const i32x4 0 0 0 0))
        (local.set $k (i32.const 0))
        (block $kd (loop $kl
          (br_if $kd (i32.ge_u (local.get $k) (local.get $H)))
          (local.set $s (f32x4.add (local.get $s) (f32x4.mul (local.get $dc)
            (v128.load (i32.add (local.get $bn) (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2))))))))
          (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl)))
        (v128.store (i32.add (local.get $tmp) (i32.shl (local.get $j) (i32.const 2))) (local.get $dc))
        (v128.store (i32.add (local.get $dPeakAt) (i32.shl (local.get $j) (i32.const 2))) (f32x4.add (local.get $dRes) (f32x4.neg (local.get $s))))
        (local.set $j (i32.add (local.get $j) (i32.const 4))) (br $jl)))
      (local.set $k (i32.const 0))
      (block $kd2 (loop $kl2
        (br_if $kd2 (i32.ge_u (local.get $k) (local.get $H)))
        (local.set $hk (v128.load32_splat (i32.add (local.get $hr) (i32.shl (local.get $k) (i32.const 2)))))
        (local.set $j (i32.const 0))
        (block $jd2 (loop $jl2
          (br_if $jd2 (i32.ge_u (local.get $j) (local.get $Hp)))
          (local.set $p (i32.add (i32.mul (local.get $k) (local.get $rowB)) (i32.shl (local.get $j) (i32.const 2))))
          (local.set $q (i32.shl (i32.add (i32.mul (local.get $n) (local.get $Hp)) (local.get $j)) (i32.const 2)))
          (local.set $s (f32x4.div
            (f32x4.add
              (f32x4.mul (v128.load (i32.add (local.get $tmp) (i32.shl (local.get $j) (i32.const 2)))) (v128.load (i32.add (local.get $bn) (local.get $p))))
              (f32x4.mul (v128.load (i32.add (local.get $dPeakAt) (i32.shl (local.get $j) (i32.const 2))))
                (v128.bitselect (v128.const f32x4 1 1 1 1) (v128.const f32x4 0 0 0 0)
                  (f32x4.eq (f32x4.div (f32x4.add (local.get $hk) (v128.load (i32.add (local.get $w) (local.get $p)))) (local.get $dv))
                    (v128.load (i32.add (local.get $peak) (local.get $q)))))))
            (local.get $dv)))
          (v128.store (i32.add (local.get $ds) (local.get $p)) (local.get $s))
          (v128.store (i32.add (local.get $dw) (local.get $p)) (f32x4.add (v128.load (i32.add (local.get $dw) (local.get $p))) (local.get $s)))
          (local.set $j (i32.add (local.get $j) (i32.const 4))) (br $jl2)))
        (local.set $k (i32.add (local.get $k) (i32.const 1))) (br $kl2)))
      (call $row_sums (local.get $ds) (i32.add (local.get $dh) (i32.shl (i32.mul (local.get $n) (local.get $H)) (i32.const 2))) (local.get $H) (local.get $Hp))
      (local.set $n (i32.add (local.get $n) (i32.const 1))) (br $nl))))
)
