;; The scan's inner loops in WebAssembly with 128-bit SIMD: one call of scanRow
;; scans one row of windows at one scale. scan-kernel.ts owns the memory: it
;; copies the image's two integral tables in, writes the cascade compiled for
;; the scale, sets the globals below, calls scanRow for each row and reads the
;; accepted windows back. scripts/build-scan-kernel.js compiles this file to
;; scan-kernel-binary.ts.
;;
;; Each f64x2 lane holds one window. Every lane does exactly the scalar
;; arithmetic in the order scan-image.ts states (WebAssembly has no fused
;; multiply-add, and lane operations round like scalar ones), so decisions and
;; scores are the same bits as a window-by-window evaluation.
;;
;; Addresses are byte addresses. A window is named by the address of its
;; top-left entry in the sum table; corner offsets are in bytes, so a corner's
;; entry is at window + offset. This V8 does not inline WebAssembly calls, so
;; the hot loop is one function and repeated loads are written out in place.
(module
  (memory (export "memory") 1)

  ;; Layout of one image.
  (global $squaredDistance (export "squaredDistance") (mut i32) (i32.const 0)) ;; squared-sum table address − sum table address
  ;; The live-window list: window addresses (i32), 1/σ (f64), scores (f64),
  ;; with three spare slots past the longest row.
  (global $windowsAt (export "windowsAt") (mut i32) (i32.const 0))
  (global $inverseDeviationsAt (export "inverseDeviationsAt") (mut i32) (i32.const 0))
  (global $scoresAt (export "scoresAt") (mut i32) (i32.const 0))
  ;; Work tally, f64 slots: 0 windows, 1 flat, 2 weak classifiers evaluated,
  ;; 3 accepted, 4 + k rejected by stage k.
  (global $tallyAt (export "tallyAt") (mut i32) (i32.const 0))

  ;; The cascade at one scale, as three record arrays in evaluation order:
  ;;   stage (16 bytes):  threshold f64 @0, end of its weak records (address) i32 @8
  ;;   weak (32 bytes):   splitValue f64 @0, belowOutput f64 @8, aboveOutput f64 @16,
  ;;                      end of its corner records (address) i32 @24,
  ;;                      place in its tree i32 @28: (split count << 16) | heap index
  ;;   corner (16 bytes): offset (bytes) i32 @0, coefficient f64 @8
  ;; A weak record is one split (node) of a weak classifier: a stump is one record
  ;; (place 1 << 16); a tree of depth d is 2^d − 1 records, its splits in heap order
  ;; (split k leads below to 2k + 1, above to 2k + 2), the bottom level's records
  ;; holding the leaf outputs as their below/above outputs (0 in the others).
  ;; Stage k's weak records start where stage k − 1's end (the first at
  ;; weaksAt), and a weak classifier's corners likewise (the first at cornersAt).
  (global $stageCount (export "stageCount") (mut i32) (i32.const 0))
  (global $stagesAt (export "stagesAt") (mut i32) (i32.const 0))
  (global $weaksAt (export "weaksAt") (mut i32) (i32.const 0))
  (global $cornersAt (export "cornersAt") (mut i32) (i32.const 0))
  ;; Tree scratch: 32 bytes per heap index, the path masks of the four windows of
  ;; a group (half A @0, half B @16) for the split they reach.
  (global $treeScratchAt (export "treeScratchAt") (mut i32) (i32.const 0))
  ;; Window corners (byte offsets) for σ, and 1 / pixels per window.
  (global $bottomRight (export "bottomRight") (mut i32) (i32.const 0))
  (global $bottomLeft (export "bottomLeft") (mut i32) (i32.const 0))
  (global $topRight (export "topRight") (mut i32) (i32.const 0))
  (global $inverseCount (export "inverseCount") (mut f64) (f64.const 0))
  (global $flatVariance (export "flatVariance") (mut f64) (f64.const 0))
  ;; Window-list mode. presetCount ≥ 0: the live list already holds that many
  ;; windows with their 1/σ (written by the caller, flat windows left out), so
  ;; scanRow skips the row and starts at the first stage. keepAll = 1: every
  ;; listed window survives every stage with its evidence (the margin itself
  ;; for a one-stage call), in list order, so callers can read scores of
  ;; windows that a stage rejects.
  (global $presetCount (export "presetCount") (mut i32) (i32.const -1))
  (global $keepAll (export "keepAll") (mut i32) (i32.const 0))

  ;; Adds `amount` to tally slot `slot` (once per row and stage, not per window).
  (func $addToTally (param $slot i32) (param $amount f64)
    (local $at i32)
    (local.set $at (i32.add (global.get $tallyAt) (i32.shl (local.get $slot) (i32.const 3))))
    (f64.store (local.get $at) (f64.add (f64.load (local.get $at)) (local.get $amount))))

  ;; Scans the windows firstWindow, firstWindow + step, … ≤ lastWindow (byte
  ;; addresses, step in bytes) of one row through every stage. Leaves the
  ;; accepted windows in the live list (address, 1/σ, evidence, or 0 without
  ;; stages) and returns how many there are. Adds to the tally.
  ;;
  ;; Windows go four at a time (two f64x2 halves, A and B) through each stage:
  ;; the score is Σ outputs from 0 in classifier order; a classifier's value is
  ;; Σ coefficient · entry over its corners from 0 in corner order, and it adds
  ;; belowOutput when value · (1/σ) < splitValue, else aboveOutput (a tree adds
  ;; the output of the leaf its splits lead to, once, after its last record). A window
  ;; passes when its margin, score − threshold, is ≥ 0. A window's evidence is
  ;; the sum of its margins over the stages it passed, added in stage order
  ;; (((m₀ + m₁) + m₂) + …, the first stage's margin alone at the first stage of
  ;; the call); that is the score it leaves in the list.
  ;;
  ;; Stage 0 of a row at a one-pixel shift takes its windows straight from the
  ;; row, four adjacent ones at a time, computing σ on the way (flat windows
  ;; fail). Other rows first list their windows that are not flat, with 1/σ,
  ;; two at a time. Every other stage reads the list that the previous stage
  ;; left and compacts it in place (a group is read before any of its slots
  ;; can be written).
  (func (export "scanRow") (param $firstWindow i32) (param $lastWindow i32) (param $step i32) (result i32)
    (local $window0 i32) (local $window1 i32) (local $window2 i32) (local $window3 i32) (local $second i32)
    (local $take0 i32) (local $take1 i32) (local $take2 i32) (local $take3 i32)
    (local $fromRow i32) (local $adjacent i32) (local $listed i32)
    (local $offset i32) (local $count i32) (local $kept i32) (local $index i32) (local $windows i32) (local $nonFlat i32)
    (local $stage i32) (local $stageAt i32) (local $stageWeaks i32) (local $stageCorners i32)
    (local $weak i32) (local $weaksEnd i32) (local $corner i32) (local $cornersEnd i32) (local $lastSlot i32)
    (local $total v128) (local $totalSquared v128) (local $mean v128) (local $variance v128) (local $keep v128)
    (local $coefficient v128) (local $inverseA v128) (local $inverseB v128) (local $valueA v128) (local $valueB v128)
    (local $scoreA v128) (local $scoreB v128) (local $below v128) (local $above v128) (local $split v128)
    (local $threshold v128) (local $keepA v128) (local $keepB v128) (local $priorA v128) (local $priorB v128)
    (local $bottomRight i32) (local $bottomLeft i32) (local $topRight i32) (local $squaredDistance i32)
    (local $windowsAt i32) (local $inverseDeviationsAt i32) (local $scoresAt i32)
    (local $inverseCount v128) (local $flatVariance v128) (local $keepAllMask v128)
    (local $place i32) (local $node i32) (local $splitCount i32) (local $pathAt i32)
    (local $maskA v128) (local $maskB v128) (local $activeA v128) (local $activeB v128) (local $treeA v128) (local $treeB v128)
    ;; Globals into locals once per row (the loops then keep them in registers).
    (local.set $bottomRight (global.get $bottomRight))
    (local.set $bottomLeft (global.get $bottomLeft))
    (local.set $topRight (global.get $topRight))
    (local.set $squaredDistance (global.get $squaredDistance))
    (local.set $windowsAt (global.get $windowsAt))
    (local.set $inverseDeviationsAt (global.get $inverseDeviationsAt))
    (local.set $scoresAt (global.get $scoresAt))
    (local.set $inverseCount (f64x2.splat (global.get $inverseCount)))
    (local.set $flatVariance (f64x2.splat (global.get $flatVariance)))

    ;; All ones when every window is kept (keepAll), else all zeros.
    (local.set $keepAllMask (i64x2.splat (i64.extend_i32_u (i32.sub (i32.const 0) (global.get $keepAll)))))
    (if (i32.ge_s (global.get $presetCount) (i32.const 0))
      (then (local.set $count (global.get $presetCount)))
      (else
    (local.set $fromRow (i32.and (i32.eq (local.get $step) (i32.const 8)) (i32.ne (global.get $stageCount) (i32.const 0))))
    (if (i32.eqz (local.get $fromRow))
      (then
        ;; σ of every window of the row, two at a time; windows that are not
        ;; flat are listed with their 1/σ.
        (local.set $window0 (local.get $firstWindow))
        (block $rowDone
          (loop $nextPair
            (br_if $rowDone (i32.gt_u (local.get $window0) (local.get $lastWindow)))
            ;; The second lane takes the next window, or repeats the first (and is dropped) at the row's end.
            (local.set $window1 (i32.add (local.get $window0) (local.get $step)))
            (local.set $second (i32.le_u (local.get $window1) (local.get $lastWindow)))
            (local.set $window1 (select (local.get $window1) (local.get $window0) (local.get $second)))
            (local.set $windows (i32.add (local.get $windows) (i32.add (i32.const 1) (local.get $second))))
            (local.set $total
              (f64x2.add
                (f64x2.sub
                  (f64x2.sub
                    (v128.load64_lane 1 (i32.add (local.get $window1) (local.get $bottomRight))
                      (v128.load64_zero (i32.add (local.get $window0) (local.get $bottomRight))))
                    (v128.load64_lane 1 (i32.add (local.get $window1) (local.get $bottomLeft))
                      (v128.load64_zero (i32.add (local.get $window0) (local.get $bottomLeft)))))
                  (v128.load64_lane 1 (i32.add (local.get $window1) (local.get $topRight))
                    (v128.load64_zero (i32.add (local.get $window0) (local.get $topRight)))))
                (v128.load64_lane 1 (local.get $window1) (v128.load64_zero (local.get $window0)))))
            (local.set $offset (local.get $squaredDistance))
            (local.set $totalSquared
              (f64x2.add
                (f64x2.sub
                  (f64x2.sub
                    (v128.load64_lane 1 (i32.add (local.get $window1) (i32.add (local.get $offset) (local.get $bottomRight)))
                      (v128.load64_zero (i32.add (local.get $window0) (i32.add (local.get $offset) (local.get $bottomRight)))))
                    (v128.load64_lane 1 (i32.add (local.get $window1) (i32.add (local.get $offset) (local.get $bottomLeft)))
                      (v128.load64_zero (i32.add (local.get $window0) (i32.add (local.get $offset) (local.get $bottomLeft))))))
                  (v128.load64_lane 1 (i32.add (local.get $window1) (i32.add (local.get $offset) (local.get $topRight)))
                    (v128.load64_zero (i32.add (local.get $window0) (i32.add (local.get $offset) (local.get $topRight))))))
                (v128.load64_lane 1 (i32.add (local.get $window1) (local.get $offset))
                  (v128.load64_zero (i32.add (local.get $window0) (local.get $offset))))))
            (local.set $mean (f64x2.mul (local.get $total) (local.get $inverseCount)))
            (local.set $variance
              (f64x2.sub
                (f64x2.mul (local.get $totalSquared) (local.get $inverseCount))
                (f64x2.mul (local.get $mean) (local.get $mean))))
            ;; Not flat: variance ≥ the flat limit. A flat lane's 1/σ may be huge or NaN; it is not listed.
            (local.set $keep (v128.not (f64x2.lt (local.get $variance) (local.get $flatVariance))))
            ;; Listed either way, the slot taken only when kept: no branch to mispredict.
            (local.set $total (f64x2.div (f64x2.splat (f64.const 1)) (f64x2.sqrt (local.get $variance))))
            (i32.store (i32.add (local.get $windowsAt) (i32.shl (local.get $count) (i32.const 2))) (local.get $window0))
            (v128.store64_lane 0 (i32.add (local.get $inverseDeviationsAt) (i32.shl (local.get $count) (i32.const 3))) (local.get $total))
            (local.set $count (i32.add (local.get $count) (i32.and (i32.wrap_i64 (i64x2.extract_lane 0 (local.get $keep))) (i32.const 1))))
            (i32.store (i32.add (local.get $windowsAt) (i32.shl (local.get $count) (i32.const 2))) (local.get $window1))
            (v128.store64_lane 1 (i32.add (local.get $inverseDeviationsAt) (i32.shl (local.get $count) (i32.const 3))) (local.get $total))
            (local.set $count (i32.add (local.get $count) (i32.and (i32.wrap_i64 (i64x2.extract_lane 1 (local.get $keep))) (local.get $second))))
            (local.set $window0 (i32.add (local.get $window1) (local.get $step)))
            (br $nextPair)))
        (call $addToTally (i32.const 0) (f64.convert_i32_u (local.get $windows)))
        (call $addToTally (i32.const 1) (f64.convert_i32_u (i32.sub (local.get $windows) (local.get $count))))))))

    (local.set $stageAt (global.get $stagesAt))
    (local.set $stageWeaks (global.get $weaksAt))
    (local.set $stageCorners (global.get $cornersAt))
    (block $stagesDone
      (loop $nextStage
        (br_if $stagesDone (i32.ge_u (local.get $stage) (global.get $stageCount)))
        (br_if $stagesDone (i32.and (i32.eqz (local.get $count)) (i32.eqz (local.get $fromRow))))
        (local.set $threshold (v128.load64_splat (local.get $stageAt)))
        (local.set $weaksEnd (i32.load offset=8 (local.get $stageAt)))
        (if (i32.eqz (local.get $fromRow))
          (then
            ;; The spare slots repeat the last window, so a group past the end reads real windows.
            (local.set $lastSlot (i32.add (local.get $windowsAt) (i32.shl (i32.sub (local.get $count) (i32.const 1)) (i32.const 2))))
            (local.set $window3 (i32.load (local.get $lastSlot)))
            (i32.store offset=4 (local.get $lastSlot) (local.get $window3))
            (i32.store offset=8 (local.get $lastSlot) (local.get $window3))
            (i32.store offset=12 (local.get $lastSlot) (local.get $window3))))
        (local.set $kept (i32.const 0))
        (local.set $index (i32.const 0))
        (local.set $window0 (local.get $firstWindow))
        (block $groupsDone
          (loop $nextGroup
            (if (local.get $fromRow)
              (then
                ;; The next four windows of the row. Past the row's end they
                ;; read the following table entries (scan-kernel.ts pads the
                ;; tables for the last row) and are not taken.
                (br_if $groupsDone (i32.gt_u (local.get $window0) (local.get $lastWindow)))
                (local.set $window1 (i32.add (local.get $window0) (i32.const 8)))
                (local.set $window2 (i32.add (local.get $window0) (i32.const 16)))
                (local.set $window3 (i32.add (local.get $window0) (i32.const 24)))
                (local.set $take1 (i32.le_u (local.get $window1) (local.get $lastWindow)))
                (local.set $take2 (i32.le_u (local.get $window2) (local.get $lastWindow)))
                (local.set $take3 (i32.le_u (local.get $window3) (local.get $lastWindow)))
                (local.set $windows (i32.add (local.get $windows)
                  (i32.add (i32.add (i32.const 1) (local.get $take1)) (i32.add (local.get $take2) (local.get $take3)))))
                (local.set $adjacent (i32.const 1))
                ;; σ of windows 0, 1 (half A) and 2, 3 (half B).
                (local.set $offset (i32.add (local.get $window0) (local.get $squaredDistance)))
                (local.set $total
                  (f64x2.add
                    (f64x2.sub
                      (f64x2.sub
                        (v128.load (i32.add (local.get $window0) (local.get $bottomRight)))
                        (v128.load (i32.add (local.get $window0) (local.get $bottomLeft))))
                      (v128.load (i32.add (local.get $window0) (local.get $topRight))))
                    (v128.load (local.get $window0))))
                (local.set $totalSquared
                  (f64x2.add
                    (f64x2.sub
                      (f64x2.sub
                        (v128.load (i32.add (local.get $offset) (local.get $bottomRight)))
                        (v128.load (i32.add (local.get $offset) (local.get $bottomLeft))))
                      (v128.load (i32.add (local.get $offset) (local.get $topRight))))
                    (v128.load (local.get $offset))))
                (local.set $mean (f64x2.mul (local.get $total) (local.get $inverseCount)))
                (local.set $variance
                  (f64x2.sub (f64x2.mul (local.get $totalSquared) (local.get $inverseCount)) (f64x2.mul (local.get $mean) (local.get $mean))))
                (local.set $keepA (v128.not (f64x2.lt (local.get $variance) (local.get $flatVariance))))
                (local.set $inverseA (f64x2.div (f64x2.splat (f64.const 1)) (f64x2.sqrt (local.get $variance))))
                (local.set $total
                  (f64x2.add
                    (f64x2.sub
                      (f64x2.sub
                        (v128.load offset=16 (i32.add (local.get $window0) (local.get $bottomRight)))
                        (v128.load offset=16 (i32.add (local.get $window0) (local.get $bottomLeft))))
                      (v128.load offset=16 (i32.add (local.get $window0) (local.get $topRight))))
                    (v128.load offset=16 (local.get $window0))))
                (local.set $totalSquared
                  (f64x2.add
                    (f64x2.sub
                      (f64x2.sub
                        (v128.load offset=16 (i32.add (local.get $offset) (local.get $bottomRight)))
                        (v128.load offset=16 (i32.add (local.get $offset) (local.get $bottomLeft))))
                      (v128.load offset=16 (i32.add (local.get $offset) (local.get $topRight))))
                    (v128.load offset=16 (local.get $offset))))
                (local.set $mean (f64x2.mul (local.get $total) (local.get $inverseCount)))
                (local.set $variance
                  (f64x2.sub (f64x2.mul (local.get $totalSquared) (local.get $inverseCount)) (f64x2.mul (local.get $mean) (local.get $mean))))
                (local.set $keepB (v128.not (f64x2.lt (local.get $variance) (local.get $flatVariance))))
                (local.set $inverseB (f64x2.div (f64x2.splat (f64.const 1)) (f64x2.sqrt (local.get $variance))))
                ;; A window is taken when it is in the row and not flat.
                (local.set $take0 (i32.and (i32.wrap_i64 (i64x2.extract_lane 0 (local.get $keepA))) (i32.const 1)))
                (local.set $take1 (i32.and (i32.wrap_i64 (i64x2.extract_lane 1 (local.get $keepA))) (local.get $take1)))
                (local.set $take2 (i32.and (i32.wrap_i64 (i64x2.extract_lane 0 (local.get $keepB))) (local.get $take2)))
                (local.set $take3 (i32.and (i32.wrap_i64 (i64x2.extract_lane 1 (local.get $keepB))) (local.get $take3)))
                (local.set $nonFlat (i32.add (local.get $nonFlat)
                  (i32.add (i32.add (local.get $take0) (local.get $take1)) (i32.add (local.get $take2) (local.get $take3))))))
              (else
                ;; The next four listed windows; a slot past the list's end is not taken.
                (br_if $groupsDone (i32.ge_u (local.get $index) (local.get $count)))
                (local.set $offset (i32.add (local.get $windowsAt) (i32.shl (local.get $index) (i32.const 2))))
                (local.set $window0 (i32.load (local.get $offset)))
                (local.set $window1 (i32.load offset=4 (local.get $offset)))
                (local.set $window2 (i32.load offset=8 (local.get $offset)))
                (local.set $window3 (i32.load offset=12 (local.get $offset)))
                (local.set $offset (i32.add (local.get $inverseDeviationsAt) (i32.shl (local.get $index) (i32.const 3))))
                (local.set $inverseA (v128.load (local.get $offset)))
                (local.set $inverseB (v128.load offset=16 (local.get $offset)))
                ;; The evidence so far: the sum of the earlier stages' margins (unused at the first stage).
                (local.set $offset (i32.add (local.get $scoresAt) (i32.shl (local.get $index) (i32.const 3))))
                (local.set $priorA (v128.load (local.get $offset)))
                (local.set $priorB (v128.load offset=16 (local.get $offset)))
                (local.set $take0 (i32.const 1))
                (local.set $take1 (i32.lt_u (i32.add (local.get $index) (i32.const 1)) (local.get $count)))
                (local.set $take2 (i32.lt_u (i32.add (local.get $index) (i32.const 2)) (local.get $count)))
                (local.set $take3 (i32.lt_u (i32.add (local.get $index) (i32.const 3)) (local.get $count)))
                ;; Four adjacent listed windows read each corner with two plain loads
                ;; (the spare slots repeat a window, so all three gaps are checked).
                (local.set $adjacent
                  (i32.and
                    (i32.and
                      (i32.eq (i32.sub (local.get $window1) (local.get $window0)) (i32.const 8))
                      (i32.eq (i32.sub (local.get $window2) (local.get $window1)) (i32.const 8)))
                    (i32.eq (i32.sub (local.get $window3) (local.get $window2)) (i32.const 8))))
                (local.set $index (i32.add (local.get $index) (i32.const 4)))))
            (local.set $scoreA (f64x2.splat (f64.const 0)))
            (local.set $scoreB (f64x2.splat (f64.const 0)))
            (local.set $weak (local.get $stageWeaks))
            (local.set $corner (local.get $stageCorners))
            ;; (a stage without weak classifiers, or a classifier without corners, adds nothing)
            (block $weaksDone
            (br_if $weaksDone (i32.ge_u (local.get $weak) (local.get $weaksEnd)))
            (loop $nextWeak
              (local.set $cornersEnd (i32.load offset=24 (local.get $weak)))
              (local.set $valueA (f64x2.splat (f64.const 0)))
              (local.set $valueB (f64x2.splat (f64.const 0)))
              (block $cornersDone
              (br_if $cornersDone (i32.ge_u (local.get $corner) (local.get $cornersEnd)))
              (if (local.get $adjacent)
                (then
                  (loop $nextAdjacentCorner
                    (local.set $offset (i32.add (local.get $window0) (i32.load (local.get $corner))))
                    (local.set $coefficient (v128.load64_splat offset=8 (local.get $corner)))
                    (local.set $valueA (f64x2.add (local.get $valueA) (f64x2.mul (local.get $coefficient) (v128.load (local.get $offset)))))
                    (local.set $valueB (f64x2.add (local.get $valueB) (f64x2.mul (local.get $coefficient) (v128.load offset=16 (local.get $offset)))))
                    (local.set $corner (i32.add (local.get $corner) (i32.const 16)))
                    (br_if $nextAdjacentCorner (i32.lt_u (local.get $corner) (local.get $cornersEnd)))))
                (else
              (loop $nextCorner
                (local.set $offset (i32.load (local.get $corner)))
                (local.set $coefficient (v128.load64_splat offset=8 (local.get $corner)))
                (local.set $valueA
                  (f64x2.add (local.get $valueA)
                    (f64x2.mul (local.get $coefficient)
                      (v128.load64_lane 1 (i32.add (local.get $window1) (local.get $offset))
                        (v128.load64_zero (i32.add (local.get $window0) (local.get $offset)))))))
                (local.set $valueB
                  (f64x2.add (local.get $valueB)
                    (f64x2.mul (local.get $coefficient)
                      (v128.load64_lane 1 (i32.add (local.get $window3) (local.get $offset))
                        (v128.load64_zero (i32.add (local.get $window2) (local.get $offset)))))))
                (local.set $corner (i32.add (local.get $corner) (i32.const 16)))
                (br_if $nextCorner (i32.lt_u (local.get $corner) (local.get $cornersEnd)))))))
              (local.set $split (v128.load64_splat (local.get $weak)))
              (local.set $below (v128.load64_splat offset=8 (local.get $weak)))
              (local.set $above (v128.load64_splat offset=16 (local.get $weak)))
              (local.set $maskA (f64x2.lt (f64x2.mul (local.get $valueA) (local.get $inverseA)) (local.get $split)))
              (local.set $maskB (f64x2.lt (f64x2.mul (local.get $valueB) (local.get $inverseB)) (local.get $split)))
              (local.set $place (i32.load offset=28 (local.get $weak)))
              (if (i32.eq (local.get $place) (i32.const 0x10000))
                (then
                  ;; A stump: its output goes straight to the score.
                  (local.set $scoreA (f64x2.add (local.get $scoreA) (v128.bitselect (local.get $below) (local.get $above) (local.get $maskA))))
                  (local.set $scoreB (f64x2.add (local.get $scoreB) (v128.bitselect (local.get $below) (local.get $above) (local.get $maskB)))))
                (else
                  ;; A tree split. Every split is evaluated for all four windows (lanes stay in
                  ;; lockstep); a lane's path mask says whether its window reaches this split. The
                  ;; root is reached by all; a split hands its mask, split by its test, to its two
                  ;; sides; at the bottom level each reached lane takes its leaf output. Exactly one
                  ;; leaf is reached per lane, so OR-ing the masked outputs yields that leaf's bits,
                  ;; which are added to the score once, after the tree's last split.
                  (local.set $node (i32.and (local.get $place) (i32.const 0xffff)))
                  (local.set $splitCount (i32.shr_u (local.get $place) (i32.const 16)))
                  (if (i32.eqz (local.get $node))
                    (then
                      (local.set $activeA (v128.const i64x2 -1 -1))
                      (local.set $activeB (v128.const i64x2 -1 -1))
                      (local.set $treeA (v128.const i64x2 0 0))
                      (local.set $treeB (v128.const i64x2 0 0)))
                    (else
                      (local.set $pathAt (i32.add (global.get $treeScratchAt) (i32.shl (local.get $node) (i32.const 5))))
                      (local.set $activeA (v128.load (local.get $pathAt)))
                      (local.set $activeB (v128.load offset=16 (local.get $pathAt)))))
                  (if (i32.ge_u (local.get $node) (i32.shr_u (local.get $splitCount) (i32.const 1)))
                    (then
                      (local.set $treeA (v128.or (local.get $treeA)
                        (v128.and (local.get $activeA) (v128.bitselect (local.get $below) (local.get $above) (local.get $maskA)))))
                      (local.set $treeB (v128.or (local.get $treeB)
                        (v128.and (local.get $activeB) (v128.bitselect (local.get $below) (local.get $above) (local.get $maskB)))))
                      (if (i32.eq (local.get $node) (i32.sub (local.get $splitCount) (i32.const 1)))
                        (then
                          (local.set $scoreA (f64x2.add (local.get $scoreA) (local.get $treeA)))
                          (local.set $scoreB (f64x2.add (local.get $scoreB) (local.get $treeB))))))
                    (else
                      ;; Sides 2k + 1 (below) and 2k + 2 (above), 32 bytes each.
                      (local.set $pathAt (i32.add (global.get $treeScratchAt)
                        (i32.shl (i32.add (i32.shl (local.get $node) (i32.const 1)) (i32.const 1)) (i32.const 5))))
                      (v128.store (local.get $pathAt) (v128.and (local.get $activeA) (local.get $maskA)))
                      (v128.store offset=16 (local.get $pathAt) (v128.and (local.get $activeB) (local.get $maskB)))
                      (v128.store offset=32 (local.get $pathAt) (v128.andnot (local.get $activeA) (local.get $maskA)))
                      (v128.store offset=48 (local.get $pathAt) (v128.andnot (local.get $activeB) (local.get $maskB)))))))
              (local.set $weak (i32.add (local.get $weak) (i32.const 32)))
              (br_if $nextWeak (i32.lt_u (local.get $weak) (local.get $weaksEnd)))))
            (local.set $scoreA (f64x2.sub (local.get $scoreA) (local.get $threshold)))
            (local.set $scoreB (f64x2.sub (local.get $scoreB) (local.get $threshold)))
            (local.set $keepA (v128.or (local.get $keepAllMask) (v128.not (f64x2.lt (local.get $scoreA) (f64x2.splat (f64.const 0))))))
            (local.set $keepB (v128.or (local.get $keepAllMask) (v128.not (f64x2.lt (local.get $scoreB) (f64x2.splat (f64.const 0))))))
            ;; A window's score is its evidence: the first stage's margin, plus each later stage's in turn.
            (if (local.get $stage)
              (then
                (local.set $scoreA (f64x2.add (local.get $priorA) (local.get $scoreA)))
                (local.set $scoreB (f64x2.add (local.get $priorB) (local.get $scoreB)))))
            ;; Write all four at `kept`, each taking its slot only when taken and passing.
            (i32.store (i32.add (local.get $windowsAt) (i32.shl (local.get $kept) (i32.const 2))) (local.get $window0))
            (v128.store64_lane 0 (i32.add (local.get $inverseDeviationsAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $inverseA))
            (v128.store64_lane 0 (i32.add (local.get $scoresAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $scoreA))
            (local.set $kept (i32.add (local.get $kept) (i32.and (i32.wrap_i64 (i64x2.extract_lane 0 (local.get $keepA))) (local.get $take0))))
            (i32.store (i32.add (local.get $windowsAt) (i32.shl (local.get $kept) (i32.const 2))) (local.get $window1))
            (v128.store64_lane 1 (i32.add (local.get $inverseDeviationsAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $inverseA))
            (v128.store64_lane 1 (i32.add (local.get $scoresAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $scoreA))
            (local.set $kept (i32.add (local.get $kept) (i32.and (i32.wrap_i64 (i64x2.extract_lane 1 (local.get $keepA))) (local.get $take1))))
            (i32.store (i32.add (local.get $windowsAt) (i32.shl (local.get $kept) (i32.const 2))) (local.get $window2))
            (v128.store64_lane 0 (i32.add (local.get $inverseDeviationsAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $inverseB))
            (v128.store64_lane 0 (i32.add (local.get $scoresAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $scoreB))
            (local.set $kept (i32.add (local.get $kept) (i32.and (i32.wrap_i64 (i64x2.extract_lane 0 (local.get $keepB))) (local.get $take2))))
            (i32.store (i32.add (local.get $windowsAt) (i32.shl (local.get $kept) (i32.const 2))) (local.get $window3))
            (v128.store64_lane 1 (i32.add (local.get $inverseDeviationsAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $inverseB))
            (v128.store64_lane 1 (i32.add (local.get $scoresAt) (i32.shl (local.get $kept) (i32.const 3))) (local.get $scoreB))
            (local.set $kept (i32.add (local.get $kept) (i32.and (i32.wrap_i64 (i64x2.extract_lane 1 (local.get $keepB))) (local.get $take3))))
            ;; (the next row-fed group starts four windows on; listed groups reload window0)
            (local.set $window0 (i32.add (local.get $window0) (i32.const 32)))
            (br $nextGroup)))
        ;; Tally the stage: windows the row had (row-fed stage 0), weak classifiers evaluated, rejections.
        (local.set $listed (local.get $count))
        (if (local.get $fromRow)
          (then
            (call $addToTally (i32.const 0) (f64.convert_i32_u (local.get $windows)))
            (call $addToTally (i32.const 1) (f64.convert_i32_u (i32.sub (local.get $windows) (local.get $nonFlat))))
            (local.set $listed (local.get $nonFlat))
            (local.set $fromRow (i32.const 0))))
        (call $addToTally (i32.const 2)
          (f64.mul (f64.convert_i32_u (local.get $listed))
            (f64.convert_i32_u (i32.shr_u (i32.sub (local.get $weaksEnd) (local.get $stageWeaks)) (i32.const 5)))))
        (call $addToTally (i32.add (i32.const 4) (local.get $stage)) (f64.convert_i32_u (i32.sub (local.get $listed) (local.get $kept))))
        (local.set $count (local.get $kept))
        ;; The next stage starts where this one's records end.
        (if (i32.gt_u (local.get $weaksEnd) (local.get $stageWeaks))
          (then (local.set $stageCorners (i32.load offset=24 (i32.sub (local.get $weaksEnd) (i32.const 32))))))
        (local.set $stageWeaks (local.get $weaksEnd))
        (local.set $stageAt (i32.add (local.get $stageAt) (i32.const 16)))
        (local.set $stage (i32.add (local.get $stage) (i32.const 1)))
        (br $nextStage)))
    (if (i32.eqz (global.get $stageCount))
      (then
        ;; Without stages every listed window is accepted with score 0.
        (memory.fill (local.get $scoresAt) (i32.const 0) (i32.shl (local.get $count) (i32.const 3)))))
    (call $addToTally (i32.const 3) (f64.convert_i32_u (local.get $count)))
    (local.get $count))
)
