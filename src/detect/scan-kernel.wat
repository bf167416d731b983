;; The scan's inner loops in WebAssembly (with 128-bit SIMD): one call scans one
;; row of windows at one scale. scan-kernel.ts owns the memory layout: it copies
;; the image's two integral tables in, writes the cascade compiled for the scale,
;; sets the globals below, calls scanRow for each row and reads the accepted
;; windows back. Compiled to scan-kernel-binary.ts by scripts/build-scan-kernel.js.
;;
;; Windows go two at a time, one per f64x2 lane. Every lane does exactly the
;; scalar arithmetic of the reference order (scan-image.ts states it): table
;; entries combined in the same order, products and sums rounded the same way
;; (no fused multiply-add in WebAssembly), so decisions and scores are the
;; same bits as window-by-window evaluation.
;;
;; Addresses are byte addresses into memory. A window is named by the byte
;; address of its top-left entry in the sum table; corner offsets are stored
;; pre-multiplied by 8, so a corner's entry is at window + offset.
(module
  (memory (export "memory") 1)

  ;; Layout of one image.
  (global $sumAt (export "sumAt") (mut i32) (i32.const 0))
  ;; squared-sum table address minus sum table address (both tables have the same shape)
  (global $squaredDistance (export "squaredDistance") (mut i32) (i32.const 0))
  ;; live-window list: window addresses (i32), 1/σ (f64), scores (f64); one spare slot
  (global $windowsAt (export "windowsAt") (mut i32) (i32.const 0))
  (global $inverseDeviationsAt (export "inverseDeviationsAt") (mut i32) (i32.const 0))
  (global $scoresAt (export "scoresAt") (mut i32) (i32.const 0))
  ;; work tally, f64 slots: 0 windows, 1 flat, 2 weak classifiers evaluated, 3 accepted, 4 + k rejected by stage k
  (global $tallyAt (export "tallyAt") (mut i32) (i32.const 0))

  ;; The cascade at one scale. Corners of weak classifier w are corners
  ;; weakEnds[w − 1] .. weakEnds[w] − 1 (from 0 for w = 0); weak classifiers of
  ;; stage k are stageEnds[k − 1] .. stageEnds[k] − 1 likewise.
  (global $stageCount (export "stageCount") (mut i32) (i32.const 0))
  (global $stageEndsAt (export "stageEndsAt") (mut i32) (i32.const 0))
  (global $thresholdsAt (export "thresholdsAt") (mut i32) (i32.const 0))
  (global $weakEndsAt (export "weakEndsAt") (mut i32) (i32.const 0))
  (global $splitValuesAt (export "splitValuesAt") (mut i32) (i32.const 0))
  (global $belowOutputsAt (export "belowOutputsAt") (mut i32) (i32.const 0))
  (global $aboveOutputsAt (export "aboveOutputsAt") (mut i32) (i32.const 0))
  (global $offsetsAt (export "offsetsAt") (mut i32) (i32.const 0))
  (global $coefficientsAt (export "coefficientsAt") (mut i32) (i32.const 0))
  ;; window corners (byte offsets) for σ, and 1 / pixels per window
  (global $bottomRight (export "bottomRight") (mut i32) (i32.const 0))
  (global $bottomLeft (export "bottomLeft") (mut i32) (i32.const 0))
  (global $topRight (export "topRight") (mut i32) (i32.const 0))
  (global $inverseCount (export "inverseCount") (mut f64) (f64.const 0))
  (global $flatVariance (export "flatVariance") (mut f64) (f64.const 0))

;; Table entries at window + offset for the windows of both lanes, written out
  ;; in place wherever needed (this V8 does not inline WebAssembly calls):
  ;;   (v128.load64_lane 1 (window1 + offset) (v128.load64_zero (window0 + offset)))

  ;; Adds `amount` to tally slot `slot` (once per row and stage, not per window).
  (func $addToTally (param $slot i32) (param $amount f64)
    (local $at i32)
    (local.set $at (i32.add (global.get $tallyAt) (i32.shl (local.get $slot) (i32.const 3))))
    (f64.store (local.get $at) (f64.add (f64.load (local.get $at)) (local.get $amount))))

  ;; Scans the windows firstWindow, firstWindow + step, … ≤ lastWindow (byte
  ;; addresses, step in bytes) of one row through every stage. Leaves the
  ;; accepted windows in the live list (address, 1/σ, last stage's margin, or 0
  ;; without stages) and returns how many there are. Adds to the tally.
  ;;
  ;; One loop serves every stage. Stage 0 reads the row: σ of each window pair,
  ;; flat windows dropped, stage 0 evaluated in the same pass. Later stages read
  ;; the list that the previous stage left and compact it in place (a pair is
  ;; read before either of its slots can be written). Within a stage each pair
  ;; goes through all the stage's weak classifiers before the next pair.
  (func (export "scanRow") (param $firstWindow i32) (param $lastWindow i32) (param $step i32) (result i32)
    (local $window0 i32) (local $window1 i32) (local $second i32) (local $offset i32)
    (local $total v128) (local $totalSquared v128) (local $mean v128) (local $variance v128)
    (local $inverseDeviation v128) (local $score v128) (local $value v128) (local $keep v128) (local $threshold v128)
    (local $stage i32) (local $weak i32) (local $weakEnd i32) (local $corner i32) (local $cornerEnd i32)
    (local $count i32) (local $kept i32) (local $index i32) (local $windows i32) (local $nonFlat i32) (local $listed i32)
    (local $stageStart i32) (local $stageCornerStart i32)
    (local.set $weakEnd
      (if (result i32) (global.get $stageCount) (then (i32.load (global.get $stageEndsAt))) (else (i32.const 0))))
    (loop $nextStage
      (local.set $threshold
        (if (result v128) (global.get $stageCount)
          (then (v128.load64_splat (i32.add (global.get $thresholdsAt) (i32.shl (local.get $stage) (i32.const 3)))))
          (else (f64x2.splat (f64.const 0)))))
      (if (local.get $stage)
        (then
          ;; the spare slot repeats the last window, so an odd last pair reads a real window
          (i32.store (i32.add (global.get $windowsAt) (i32.shl (local.get $count) (i32.const 2)))
            (i32.load (i32.add (global.get $windowsAt) (i32.shl (i32.sub (local.get $count) (i32.const 1)) (i32.const 2)))))))
      (local.set $kept (i32.const 0))
      (local.set $index (i32.const 0))
      (local.set $window0 (local.get $firstWindow))
      (block $pairsDone
        (loop $nextPair
          (if (i32.eqz (local.get $stage))
            (then
              (br_if $pairsDone (i32.gt_u (local.get $window0) (local.get $lastWindow)))
              ;; The second lane takes the next window, or repeats the first (and is dropped) at the row's end.
              (local.set $window1 (i32.add (local.get $window0) (local.get $step)))
              (local.set $second (i32.le_u (local.get $window1) (local.get $lastWindow)))
              (local.set $window1 (select (local.get $window1) (local.get $window0) (local.get $second)))
              (local.set $windows (i32.add (local.get $windows) (i32.add (i32.const 1) (local.get $second))))
              (local.set $total
                (f64x2.add
                  (f64x2.sub
                    (f64x2.sub
                      (v128.load64_lane 1 (i32.add (local.get $window1) (global.get $bottomRight))
                        (v128.load64_zero (i32.add (local.get $window0) (global.get $bottomRight))))
                      (v128.load64_lane 1 (i32.add (local.get $window1) (global.get $bottomLeft))
                        (v128.load64_zero (i32.add (local.get $window0) (global.get $bottomLeft)))))
                    (v128.load64_lane 1 (i32.add (local.get $window1) (global.get $topRight))
                      (v128.load64_zero (i32.add (local.get $window0) (global.get $topRight)))))
                  (v128.load64_lane 1 (local.get $window1) (v128.load64_zero (local.get $window0)))))
              (local.set $offset (global.get $squaredDistance))
              (local.set $totalSquared
                (f64x2.add
                  (f64x2.sub
                    (f64x2.sub
                      (v128.load64_lane 1 (i32.add (local.get $window1) (i32.add (local.get $offset) (global.get $bottomRight)))
                        (v128.load64_zero (i32.add (local.get $window0) (i32.add (local.get $offset) (global.get $bottomRight)))))
                      (v128.load64_lane 1 (i32.add (local.get $window1) (i32.add (local.get $offset) (global.get $bottomLeft)))
                        (v128.load64_zero (i32.add (local.get $window0) (i32.add (local.get $offset) (global.get $bottomLeft))))))
                    (v128.load64_lane 1 (i32.add (local.get $window1) (i32.add (local.get $offset) (global.get $topRight)))
                      (v128.load64_zero (i32.add (local.get $window0) (i32.add (local.get $offset) (global.get $topRight))))))
                  (v128.load64_lane 1 (i32.add (local.get $window1) (local.get $offset))
                    (v128.load64_zero (i32.add (local.get $window0) (local.get $offset))))))
              (local.set $mean (f64x2.mul (local.get $total) (f64x2.splat (global.get $inverseCount))))
              (local.set $variance
                (f64x2.sub
                  (f64x2.mul (local.get $totalSquared) (f64x2.splat (global.get $inverseCount)))
                  (f64x2.mul (local.get $mean) (local.get $mean))))
              ;; not flat: variance ≥ the flat limit (a flat lane's 1/σ may be huge or NaN; it is dropped)
              (local.set $keep (v128.not (f64x2.lt (local.get $variance) (f64x2.splat (global.get $flatVariance)))))
              (local.set $nonFlat
                (i32.add (local.get $nonFlat)
                  (i32.add
                    (i32.and (i32.wrap_i64 (i64x2.extract_lane 0 (local.get $keep))) (i32.const 1))
                    (i32.and (i32.wrap_i64 (i64x2.extract_lane 1 (local.get $keep))) (local.get $second)))))
              (local.set $inverseDeviation (f64x2.div (f64x2.splat (f64.const 1)) (f64x2.sqrt (local.get $variance)))))
            (else
              (br_if $pairsDone (i32.ge_u (local.get $index) (local.get $count)))
              (local.set $window0 (i32.load (i32.add (global.get $windowsAt) (i32.shl (local.get $index) (i32.const 2)))))
              (local.set $window1 (i32.load offset=4 (i32.add (global.get $windowsAt) (i32.shl (local.get $index) (i32.const 2)))))
              (local.set $second (i32.lt_u (i32.add (local.get $index) (i32.const 1)) (local.get $count)))
              (local.set $inverseDeviation (v128.load (i32.add (global.get $inverseDeviationsAt) (i32.shl (local.get $index) (i32.const 3)))))
              (local.set $keep (v128.const i64x2 -1 -1))
              (local.set $index (i32.add (local.get $index) (i32.const 2)))))
          ;; The stage's score: Σ outputs of its weak classifiers from 0 in
          ;; classifier order; a classifier's value is Σ coefficient · entry over
          ;; its corners from 0 in corner order, and it adds belowOutput when
          ;; value · (1/σ) < splitValue, else aboveOutput. Margin = score − threshold.
          (local.set $score (f64x2.splat (f64.const 0)))
          (if (global.get $stageCount)
            (then
              (local.set $weak (local.get $stageStart))
              (local.set $corner (local.get $stageCornerStart))
              (block $weaksDone
                (loop $nextWeak
                  (br_if $weaksDone (i32.ge_u (local.get $weak) (local.get $weakEnd)))
                  (local.set $cornerEnd (i32.load (i32.add (global.get $weakEndsAt) (i32.shl (local.get $weak) (i32.const 2)))))
                  (local.set $value (f64x2.splat (f64.const 0)))
                  (block $cornersDone
                  (loop $nextCorner
                    (br_if $cornersDone (i32.ge_u (local.get $corner) (local.get $cornerEnd)))
                    (local.set $offset (i32.load (i32.add (global.get $offsetsAt) (i32.shl (local.get $corner) (i32.const 2)))))
                    (local.set $value
                      (f64x2.add (local.get $value)
                        (f64x2.mul
                          (v128.load64_splat (i32.add (global.get $coefficientsAt) (i32.shl (local.get $corner) (i32.const 3))))
                          (v128.load64_lane 1 (i32.add (local.get $window1) (local.get $offset))
                            (v128.load64_zero (i32.add (local.get $window0) (local.get $offset)))))))
                    (local.set $corner (i32.add (local.get $corner) (i32.const 1)))
                    (br $nextCorner)))
                  (local.set $score
                    (f64x2.add (local.get $score)
                      (v128.bitselect
                        (v128.load64_splat (i32.add (global.get $belowOutputsAt) (i32.shl (local.get $weak) (i32.const 3))))
                        (v128.load64_splat (i32.add (global.get $aboveOutputsAt) (i32.shl (local.get $weak) (i32.const 3))))
                        (f64x2.lt
                          (f64x2.mul (local.get $value) (local.get $inverseDeviation))
                          (v128.load64_splat (i32.add (global.get $splitValuesAt) (i32.shl (local.get $weak) (i32.const 3))))))))
                  (local.set $weak (i32.add (local.get $weak) (i32.const 1)))
                  (br $nextWeak)))
              (local.set $score (f64x2.sub (local.get $score) (local.get $threshold)))
              (local.set $keep (v128.and (local.get $keep) (v128.not (f64x2.lt (local.get $score) (f64x2.splat (f64.const 0))))))))
          ;; Append both lanes at `kept`; a lane that is not kept is written
          ;; anyway and overwritten by the next kept one (no branch to mispredict).
          (i32.store (i32.add (global.get $windowsAt) (i32.shl (local.get $kept) (i32.const 2))) (local.get $window0))
          (v128.store64_lane 0 (i32.add (global.get $inverseDeviationsAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $inverseDeviation))
          (v128.store64_lane 0 (i32.add (global.get $scoresAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $score))
          (local.set $kept (i32.add (local.get $kept) (i32.and (i32.wrap_i64 (i64x2.extract_lane 0 (local.get $keep))) (i32.const 1))))
          (i32.store (i32.add (global.get $windowsAt) (i32.shl (local.get $kept) (i32.const 2))) (local.get $window1))
          (v128.store64_lane 1 (i32.add (global.get $inverseDeviationsAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $inverseDeviation))
          (v128.store64_lane 1 (i32.add (global.get $scoresAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $score))
          (local.set $kept (i32.add (local.get $kept) (i32.and (i32.wrap_i64 (i64x2.extract_lane 1 (local.get $keep))) (local.get $second))))
          (local.set $window0 (i32.add (local.get $window1) (local.get $step)))
          (br $nextPair)))
      ;; Tally the stage: windows looked at (stage 0 only), weak classifiers evaluated, rejections.
      (local.set $listed (local.get $count))
      (if (i32.eqz (local.get $stage))
        (then
          (call $addToTally (i32.const 0) (f64.convert_i32_u (local.get $windows)))
          (call $addToTally (i32.const 1) (f64.convert_i32_u (i32.sub (local.get $windows) (local.get $nonFlat))))
          (local.set $listed (local.get $nonFlat))))
      (if (global.get $stageCount)
        (then
          (call $addToTally (i32.const 2) (f64.mul (f64.convert_i32_u (local.get $listed)) (f64.convert_i32_u (i32.sub (local.get $weakEnd) (local.get $stageStart)))))
          (call $addToTally (i32.add (i32.const 4) (local.get $stage)) (f64.convert_i32_u (i32.sub (local.get $listed) (local.get $kept))))))
      (local.set $count (local.get $kept))
      (local.set $stage (i32.add (local.get $stage) (i32.const 1)))
      (local.set $stageStart (local.get $weakEnd))
      (if (i32.lt_u (local.get $stage) (global.get $stageCount))
        (then
          (local.set $stageCornerStart (i32.load (i32.sub (i32.add (global.get $weakEndsAt) (i32.shl (local.get $stageStart) (i32.const 2))) (i32.const 4))))
          (local.set $weakEnd (i32.load (i32.add (global.get $stageEndsAt) (i32.shl (local.get $stage) (i32.const 2)))))
          (br_if $nextStage (local.get $count)))))
    (call $addToTally (i32.const 3) (f64.convert_i32_u (local.get $count)))
    (local.get $count))
)
