/* ---- detector code (the same for every cascade; the tables above are the cascade) ---- */
#include <string.h>
#ifndef RBD_INTEGER
#include <math.h>
#endif

#ifdef RBD_INTEGER
typedef uint32_t rbd_entry;       /* integral-image entry */
typedef int64_t rbd_coefficient;  /* corner coefficient, RBD_VALUE_BITS fractional bits */
typedef int64_t rbd_score;        /* votes, RBD_VOTE_BITS fractional bits */
#else
typedef double rbd_entry;
typedef double rbd_coefficient;
typedef double rbd_score;
#endif

/* At most four corners per rectangle at any scale. */
#define RBD_CORNER_CAPACITY (RBD_RECTANGLE_COUNT > 0 ? 4 * RBD_RECTANGLE_COUNT : 1)
#define RBD_CLASSIFIER_CAPACITY (RBD_CLASSIFIER_COUNT > 0 ? RBD_CLASSIFIER_COUNT : 1)
/* Windows whose pixel variance is below this are flat (rectboost's FLAT_WINDOW_VARIANCE). */
#define RBD_FLAT_VARIANCE 1e-4

/* One raw hit: an accepted window. */
typedef struct rbd_hit {
  int32_t x, y, width, height;
  rbd_score score;
} rbd_hit;

/* Work buffer, carved in this order (each part 8-byte aligned). */
typedef struct rbd_work {
  rbd_entry *sum;      /* the upright table; with RBD_TILTED the rotated one follows it */
  rbd_entry *squared;
  int32_t *corner_offset;
  rbd_coefficient *corner_coefficient;
  int32_t *classifier_corner_end;
  rbd_hit *hits;
  int32_t *order;
  int32_t *scratch;
  int32_t *by_x;
  int32_t *link;
  int32_t *group;
  rbd_detection *detections;
  rbd_entry *rays;     /* two rows of up-right ray sums, for the rotated table (RBD_TILTED) */
} rbd_work;

static size_t rbd_aligned(size_t bytes) { return (bytes + 7u) & ~(size_t)7u; }

size_t rbd_work_bytes(int32_t width, int32_t height, int32_t hit_capacity) {
  size_t entries;
  size_t per_hit = rbd_aligned(sizeof(rbd_hit)) + 5u * sizeof(int32_t) + rbd_aligned(sizeof(rbd_detection));
  if (width < 1 || height < 1 || hit_capacity < 1) return 0;
  if ((uint64_t)width * (uint64_t)height > RBD_MAX_IMAGE_PIXELS) return 0;
  entries = ((size_t)width + 1u) * ((size_t)height + 1u);
  return rbd_aligned((RBD_TILTED ? 2u : 1u) * entries * sizeof(rbd_entry)) + rbd_aligned(entries * sizeof(rbd_entry))
       + (RBD_TILTED ? 2u * rbd_aligned(((size_t)width + 1u) * sizeof(rbd_entry)) : 0u)
       + rbd_aligned(RBD_CORNER_CAPACITY * sizeof(int32_t))
       + rbd_aligned(RBD_CORNER_CAPACITY * sizeof(rbd_coefficient))
       + rbd_aligned(RBD_CLASSIFIER_CAPACITY * sizeof(int32_t))
       + (size_t)hit_capacity * per_hit + 8u * 8u;
}

static void *rbd_take(unsigned char **at, size_t bytes) {
  void *start = *at;
  *at += rbd_aligned(bytes);
  return start;
}

static void rbd_carve(rbd_work *w, void *memory, size_t entries, size_t rays_per_row, int32_t hits) {
  unsigned char *at = (unsigned char *)memory;
  size_t n = (size_t)hits;
  w->sum = (rbd_entry *)rbd_take(&at, (RBD_TILTED ? 2u : 1u) * entries * sizeof(rbd_entry));
  w->squared = (rbd_entry *)rbd_take(&at, entries * sizeof(rbd_entry));
  w->rays = RBD_TILTED ? (rbd_entry *)rbd_take(&at, 2u * rbd_aligned(rays_per_row * sizeof(rbd_entry))) : NULL;
  w->corner_offset = (int32_t *)rbd_take(&at, RBD_CORNER_CAPACITY * sizeof(int32_t));
  w->corner_coefficient = (rbd_coefficient *)rbd_take(&at, RBD_CORNER_CAPACITY * sizeof(rbd_coefficient));
  w->classifier_corner_end = (int32_t *)rbd_take(&at, RBD_CLASSIFIER_CAPACITY * sizeof(int32_t));
  w->hits = (rbd_hit *)rbd_take(&at, n * rbd_aligned(sizeof(rbd_hit)));
  w->order = (int32_t *)rbd_take(&at, n * sizeof(int32_t));
  w->scratch = (int32_t *)rbd_take(&at, n * sizeof(int32_t));
  w->by_x = (int32_t *)rbd_take(&at, n * sizeof(int32_t));
  w->link = (int32_t *)rbd_take(&at, n * sizeof(int32_t));
  w->group = (int32_t *)rbd_take(&at, n * sizeof(int32_t));
  w->detections = (rbd_detection *)rbd_take(&at, n * rbd_aligned(sizeof(rbd_detection)));
}

size_t rbd_table_bytes(void) { return RBD_TABLE_BYTES; }

rbd_options rbd_default_options(void) {
  rbd_options o;
#ifdef RBD_INTEGER
  o.scale_step_q16 = 81920u; /* 1.25 */
  o.shift_q16 = 65536u;      /* 1 */
  o.overlap_q16 = 19661u;    /* 0.3, rounded to 1/65536 */
#else
  o.scale_step = 1.25;
  o.shift = 1.0;
  o.overlap = 0.3;
#endif
  o.smallest_side = 0;
  o.largest_side = 0;
  o.merge = RBD_MERGE_NMS;
  o.min_support = 1;
  return o;
}

/* Both integral tables, (width + 1) x (height + 1), first row and column zero
 * (Crow 1984). Float build: doubles, exact (integers below 2^53). Integer build:
 * uint32; the sum table never wraps (image <= RBD_MAX_IMAGE_PIXELS), the squared
 * table may wrap, but C's unsigned arithmetic is modulo 2^32, so the four-corner
 * squared sum of a window is exact whenever its true value fits 32 bits
 * (window <= RBD_MAX_WINDOW_PIXELS). */
static void rbd_integrate(const uint8_t *pixels, int32_t width, int32_t height, int32_t row_bytes, rbd_entry *sum, rbd_entry *squared) {
  size_t stride = (size_t)width + 1u;
  int32_t x, y;
  for (x = 0; x <= width; x++) { sum[x] = 0; squared[x] = 0; }
  for (y = 0; y < height; y++) {
    const uint8_t *row = pixels + (size_t)y * (size_t)row_bytes;
    rbd_entry *above = sum + (size_t)y * stride, *here = above + stride;
    rbd_entry *above2 = squared + (size_t)y * stride, *here2 = above2 + stride;
    rbd_entry row_sum = 0, row_squared = 0;
    here[0] = 0;
    here2[0] = 0;
    for (x = 0; x < width; x++) {
      rbd_entry v = (rbd_entry)row[x];
      row_sum += v;
      row_squared += v * v;
      here[x + 1] = above[x + 1] + row_sum;
      here2[x + 1] = above2[x + 1] + row_squared;
    }
  }
}

#if RBD_TILTED
/* The rotated table after the upright one (rectboost's computeRotatedSum): entry (x, y)
 * sums the pixels (i, j) with j < y and x - (y - j) <= i <= x + (y - j) - 1, built top-down
 * by R(x, y) = R(x - 1, y - 1) + A(x, y - 1) + A(x - 1, y - 1), A the up-right ray sums,
 * with R(-1, y - 1) = R(0, y - 2) and A(-1, y - 1) = A(0, y - 2). Exact in both builds
 * (every entry is at most the image's pixel sum). `rays` holds two rows of width + 1. */
static void rbd_rotate(const uint8_t *pixels, int32_t width, int32_t height, int32_t row_bytes, rbd_entry *rotated, rbd_entry *rays) {
  size_t stride = (size_t)width + 1u;
  rbd_entry *above_rays = rays, *row_rays = rays + stride, *spare;
  int32_t x, y;
  for (x = 0; x <= width; x++) { rotated[x] = 0; above_rays[x] = 0; row_rays[x] = 0; }
  for (y = 1; y <= height; y++) {
    const uint8_t *row = pixels + (size_t)(y - 1) * (size_t)row_bytes;
    rbd_entry *here = rotated + (size_t)y * stride, *above = here - stride;
    for (x = 0; x < width; x++) row_rays[x] = (rbd_entry)row[x] + above_rays[x + 1];
    here[0] = (y >= 2 ? above[-(ptrdiff_t)stride] : 0) + row_rays[0] + above_rays[0];
    for (x = 1; x <= width; x++) here[x] = above[x - 1] + row_rays[x] + row_rays[x - 1];
    spare = above_rays; above_rays = row_rays; row_rays = spare;
  }
}
#endif

/* ---- one scale of the cascade ---- */

#ifdef RBD_INTEGER
/* round(v / 2^32), halves up, as Math.round does for the float build's v. */
static int32_t rbd_round_q32(uint64_t v) { return (int32_t)((v + 0x80000000ull) >> 32); }

/* numerator / denominator rounded to nearest, halves away from zero. */
static int64_t rbd_divide_rounded(int64_t numerator, int64_t denominator) {
  return numerator >= 0 ? (numerator + denominator / 2) / denominator : -((-numerator + denominator / 2) / denominator);
}
#else
/* Math.round: the nearest integer, halves up. */
static double rbd_round(double v) {
  double f = floor(v);
  return v - f >= 0.5 ? f + 1.0 : f;
}
#endif

/* Compiles every weak classifier for one scale into merged corner reads over
 * the image's integral table (rectboost's compileCascadeAtScale): each rectangle
 * edge scaled and rounded once, the weight rebalanced by base area / scaled
 * area, the four corners of every rectangle added into one list per
 * classifier (first come, first listed), then sorted by offset with zero
 * coefficients dropped. */
#if RBD_TILTED
/* A tilted rectangle at one scale (rectboost's scaleRectangle): each corner mapped in
 * rotated coordinates u = x + y, v = y - x, rounded to the nearest integer of parity
 * round(p * scale) mod 2 (p = (x + y) mod 2); sides shortened, the longer first, until it
 * fits the scaled window, then the top corner moved inside it. Writes top corner x, y and
 * the sides to out[0..3]. */
#ifdef RBD_INTEGER
/* floor(v / 2^33) for any sign (C99 leaves >> of negatives to the compiler). */
static int64_t rbd_floor_q33(int64_t v) { return v >= 0 ? v >> 33 : -((-v + (((int64_t)1 << 33) - 1)) >> 33); }
static int32_t rbd_nearest_of_parity(int32_t t, int32_t parity, uint64_t scale_q32) {
  int64_t scaled = (int64_t)t * (int64_t)scale_q32 - (int64_t)parity * ((int64_t)1 << 32);
  return parity + 2 * (int32_t)rbd_floor_q33(scaled + ((int64_t)1 << 32));
}
static void rbd_scale_tilted(const uint16_t *r, uint64_t scale_q32, int32_t window_width, int32_t window_height, int32_t *out) {
  int32_t x = r[0], y = r[1];
  int32_t parity = rbd_round_q32((uint64_t)((x + y) & 1) * scale_q32) & 1;
  int32_t u0 = rbd_nearest_of_parity(x + y, parity, scale_q32), u1 = rbd_nearest_of_parity(x + y + 2 * r[2], parity, scale_q32);
  int32_t v0 = rbd_nearest_of_parity(y - x, parity, scale_q32), v1 = rbd_nearest_of_parity(y - x + 2 * r[3], parity, scale_q32);
#else
static int32_t rbd_nearest_of_parity(int32_t t, int32_t parity, double scale) {
  return parity + 2 * (int32_t)rbd_round(((double)t * scale - (double)parity) / 2.0);
}
static void rbd_scale_tilted(const uint16_t *r, double scale, int32_t window_width, int32_t window_height, int32_t *out) {
  int32_t x = r[0], y = r[1];
  int32_t parity = (int32_t)rbd_round((double)((x + y) & 1) * scale) & 1;
  int32_t u0 = rbd_nearest_of_parity(x + y, parity, scale), u1 = rbd_nearest_of_parity(x + y + 2 * r[2], parity, scale);
  int32_t v0 = rbd_nearest_of_parity(y - x, parity, scale), v1 = rbd_nearest_of_parity(y - x + 2 * r[3], parity, scale);
#endif
  int32_t side_width = (u1 - u0) / 2, side_height = (v1 - v0) / 2;
  int32_t top_x = (u0 - v0) / 2, top_y = (u0 + v0) / 2;
  int32_t room = window_width < window_height ? window_width : window_height;
  while (side_width + side_height > room) {
    if (side_width >= side_height) side_width--;
    else side_height--;
  }
  if (top_x < side_height) top_x = side_height;
  if (top_x > window_width - side_width) top_x = window_width - side_width;
  if (top_y < 0) top_y = 0;
  if (top_y > window_height - side_width - side_height) top_y = window_height - side_width - side_height;
  out[0] = top_x; out[1] = top_y; out[2] = side_width; out[3] = side_height;
}
#endif

#ifdef RBD_INTEGER
static void rbd_compile_scale(rbd_work *w, uint64_t scale_q32, size_t stride, size_t rotated_at, int32_t window_width, int32_t window_height)
#else
static void rbd_compile_scale(rbd_work *w, double scale, size_t stride, size_t rotated_at, int32_t window_width, int32_t window_height)
#endif
{
  int32_t classifier, corners = 0, rectangle = 0;
  for (classifier = 0; classifier < RBD_CLASSIFIER_COUNT; classifier++) {
    int32_t first = corners, end = (int32_t)rbd_classifier_end[classifier], i, j;
    for (; rectangle < end; rectangle++) {
      const uint16_t *r = rbd_rectangle[rectangle];
      int32_t left, top, right, bottom, k;
      int32_t offset[4];
      rbd_coefficient weight, sign[4];
#if RBD_TILTED
      if (rbd_rectangle_tilted[rectangle]) {
        int32_t t[4];
        int32_t at = (int32_t)rotated_at, line = (int32_t)stride;
#ifdef RBD_INTEGER
        rbd_scale_tilted(r, scale_q32, window_width, window_height, t);
        weight = rbd_divide_rounded(rbd_rectangle_weight_area[rectangle], (int64_t)t[2] * (int64_t)t[3]);
#else
        rbd_scale_tilted(r, scale, window_width, window_height, t);
        weight = (rbd_rectangle_weight[rectangle] * (double)r[2] * (double)r[3]) / ((double)t[2] * (double)t[3]);
#endif
        /* bottom, left, right, top (tiltedRectangleSum) */
        offset[0] = at + (t[1] + t[2] + t[3]) * line + t[0] + t[2] - t[3]; sign[0] = weight;
        offset[1] = at + (t[1] + t[3]) * line + t[0] - t[3];               sign[1] = -weight;
        offset[2] = at + (t[1] + t[2]) * line + t[0] + t[2];               sign[2] = -weight;
        offset[3] = at + t[1] * line + t[0];                               sign[3] = weight;
        goto merge;
      }
#else
      (void)rotated_at; (void)window_width; (void)window_height;
#endif
#ifdef RBD_INTEGER
      left = rbd_round_q32((uint64_t)r[0] * scale_q32);
      top = rbd_round_q32((uint64_t)r[1] * scale_q32);
      right = rbd_round_q32((uint64_t)(r[0] + r[2]) * scale_q32);
      bottom = rbd_round_q32((uint64_t)(r[1] + r[3]) * scale_q32);
      weight = rbd_divide_rounded(rbd_rectangle_weight_area[rectangle], (int64_t)(right - left) * (int64_t)(bottom - top));
#else
      left = (int32_t)rbd_round((double)r[0] * scale);
      top = (int32_t)rbd_round((double)r[1] * scale);
      right = (int32_t)rbd_round((double)(r[0] + r[2]) * scale);
      bottom = (int32_t)rbd_round((double)(r[1] + r[3]) * scale);
      weight = (rbd_rectangle_weight[rectangle] * (double)r[2] * (double)r[3]) / ((double)(right - left) * (double)(bottom - top));
#endif
      offset[0] = bottom * (int32_t)stride + right; sign[0] = weight;
      offset[1] = bottom * (int32_t)stride + left;  sign[1] = -weight;
      offset[2] = top * (int32_t)stride + right;    sign[2] = -weight;
      offset[3] = top * (int32_t)stride + left;     sign[3] = weight;
#if RBD_TILTED
    merge:
#endif
      for (k = 0; k < 4; k++) {
        for (i = first; i < corners && w->corner_offset[i] != offset[k]; i++) {}
        if (i == corners) {
          w->corner_offset[corners] = offset[k];
          w->corner_coefficient[corners] = 0;
          corners++;
        }
        w->corner_coefficient[i] = w->corner_coefficient[i] + sign[k];
      }
    }
    /* Sort this classifier's corners by offset (insertion sort: a handful each). */
    for (i = first + 1; i < corners; i++) {
      int32_t o = w->corner_offset[i];
      rbd_coefficient c = w->corner_coefficient[i];
      for (j = i; j > first && w->corner_offset[j - 1] > o; j--) {
        w->corner_offset[j] = w->corner_offset[j - 1];
        w->corner_coefficient[j] = w->corner_coefficient[j - 1];
      }
      w->corner_offset[j] = o;
      w->corner_coefficient[j] = c;
    }
    for (i = j = first; i < corners; i++) {
      if (w->corner_coefficient[i] == 0) continue;
      w->corner_offset[j] = w->corner_offset[i];
      w->corner_coefficient[j] = w->corner_coefficient[i];
      j++;
    }
    corners = j;
    w->classifier_corner_end[classifier] = corners;
  }
}

/* THE score of a window, step by step: its evidence after stage `stage`, from
 * the evidence of the stages before and this stage's margin (sum of votes minus
 * threshold): ((m0 + m1) + m2) + ..., the first margin alone at stage 0; 0 for a
 * cascade without stages. rectboost's scan computes the same (RawHits, scanImage);
 * change the meaning of a detection's score here and only here. */
static rbd_score rbd_detection_score(int32_t stage, rbd_score evidence_before, rbd_score margin) {
  return stage == 0 ? margin : evidence_before + margin;
}

#ifdef RBD_INTEGER
/* floor(sqrt(v)) for 64-bit v, bit by bit (no floating point). */
static uint64_t rbd_isqrt(uint64_t v) {
  uint64_t root = 0, bit = (uint64_t)1 << 62;
  while (bit > v) bit >>= 2;
  while (bit != 0) {
    if (v >= root + bit) { v -= root + bit; root = (root >> 1) + bit; }
    else root >>= 1;
    bit >>= 2;
  }
  return root;
}
#endif

/* Runs the window whose top-left integral entry is `at` through the cascade.
 * Returns 1 and sets *score when every stage passes, 0 otherwise.
 *
 * Float build, in rectboost's order of arithmetic (scanImage's doc comment):
 *   total = ((S[br] - S[bl]) - S[tr]) + S[tl], and likewise for squares;
 *   mean = total * (1/n); variance = squares * (1/n) - mean * mean;
 *   flat when variance < 1e-4; inverse = 1 / sqrt(variance);
 *   value = ((0 + c0*S[o0]) + c1*S[o1]) + ...; vote = value * inverse < split ? below : above;
 *   margin = ((0 + vote0) + vote1 + ...) - threshold, passing when not below 0;
 *   score = ((margin0 + margin1) + margin2) + ... (rbd_detection_score).
 * Integer build: n^2 var = n * squares - total^2 exactly (64 bits); flat when
 * 10^4 * n^2 var < n^2; s = floor(2^7 * n * sigma) by integer square root;
 * value in RBD_VALUE_BITS fixed point; value / sigma < split becomes
 * value * n * 2^7 < split * s; votes and thresholds in RBD_VOTE_BITS fixed point. */
static int rbd_window(const rbd_work *w, size_t at, int32_t bottom_right, int32_t bottom_left, int32_t top_right,
#ifdef RBD_INTEGER
                      uint64_t count,
#else
                      double inverse_count,
#endif
                      rbd_score *score) {
  const rbd_entry *s = w->sum + at, *q = w->squared + at;
  int32_t stage, classifier = 0, corner = 0;
  rbd_score evidence = 0;
#ifdef RBD_INTEGER
  uint32_t total = s[bottom_right] - s[bottom_left] - s[top_right] + s[0];
  uint32_t squares = q[bottom_right] - q[bottom_left] - q[top_right] + q[0];
  uint64_t spread = count * (uint64_t)squares - (uint64_t)total * (uint64_t)total;
  int64_t deviation, scaled_count = (int64_t)(count << 7);
  if (spread * 10000u < count * count) return 0;
  deviation = (int64_t)rbd_isqrt(spread << 14);
#else
  double total = ((s[bottom_right] - s[bottom_left]) - s[top_right]) + s[0];
  double squares = ((q[bottom_right] - q[bottom_left]) - q[top_right]) + q[0];
  double mean = total * inverse_count;
  double variance = squares * inverse_count - mean * mean;
  double inverse;
  if (variance < RBD_FLAT_VARIANCE) return 0;
  inverse = 1.0 / sqrt(variance);
#endif
  for (stage = 0; stage < RBD_STAGE_COUNT; stage++) {
    rbd_score sum_of_votes = 0;
    int32_t stage_end = (int32_t)rbd_stage_end[stage];
    /* Records of a tree come in heap order; `reached` is the split the window's path is at
     * (splits off the path are skipped, their corners too). A stump is its own bottom split. */
    int32_t reached = 0;
    for (; classifier < stage_end; classifier++) {
      int32_t corner_end = w->classifier_corner_end[classifier];
      int32_t node = (int32_t)(rbd_node_place[classifier] & 0xffffu);
      int32_t split_count = (int32_t)(rbd_node_place[classifier] >> 16);
      int below;
      if (node != reached) {
        corner = corner_end;
        if (node == split_count - 1) reached = 0;
        continue;
      }
      {
#ifdef RBD_INTEGER
      uint64_t value = 0; /* modulo 2^64; the true value is far smaller */
      for (; corner < corner_end; corner++) value += (uint64_t)w->corner_coefficient[corner] * (uint64_t)s[w->corner_offset[corner]];
      below = (int64_t)value * scaled_count < rbd_split[classifier] * deviation;
#else
      double value = 0;
      for (; corner < corner_end; corner++) value = value + w->corner_coefficient[corner] * s[w->corner_offset[corner]];
      below = value * inverse < rbd_split[classifier];
#endif
      }
      if (node >= (split_count >> 1)) {
        sum_of_votes = sum_of_votes + (below ? rbd_below[classifier] : rbd_above[classifier]);
        reached = node == split_count - 1 ? 0 : -1;
      } else {
        reached = 2 * node + (below ? 1 : 2);
      }
    }
    {
      rbd_score margin = sum_of_votes - rbd_threshold[stage];
      if (margin < 0) return 0;
#ifdef RBD_INTEGER
      /* The pass test used the lowered threshold; the score counts from the threshold itself. */
      margin = sum_of_votes - rbd_score_threshold[stage];
#endif
      evidence = rbd_detection_score(stage, evidence, margin);
    }
  }
  *score = evidence;
  return 1;
}

/* ---- merging (rectboost's mergeDetections, same order and arithmetic) ---- */

/* Hit order: score high to low, then x, y, width ascending, then scan order. */
static int rbd_after(const rbd_hit *hits, int32_t a, int32_t b) {
  const rbd_hit *p = hits + a, *r = hits + b;
  if (p->score != r->score) return r->score > p->score;
  if (p->x != r->x) return p->x > r->x;
  if (p->y != r->y) return p->y > r->y;
  return p->width > r->width;
}

static int rbd_left_after(const rbd_hit *hits, int32_t a, int32_t b) { return hits[a].x > hits[b].x; }

/* Stable bottom-up merge sort of index[0..n) with scratch. */
static void rbd_sort(int32_t *index, int32_t *scratch, int32_t n, const rbd_hit *hits, int (*after)(const rbd_hit *, int32_t, int32_t)) {
  int32_t width, i;
  for (width = 1; width < n; width *= 2) {
    for (i = 0; i < n; i += 2 * width) {
      int32_t middle = i + width < n ? i + width : n, end = i + 2 * width < n ? i + 2 * width : n;
      int32_t a = i, b = middle, k = i;
      while (a < middle && b < end) scratch[k++] = after(hits, index[a], index[b]) ? index[b++] : index[a++];
      while (a < middle) scratch[k++] = index[a++];
      while (b < end) scratch[k++] = index[b++];
    }
    memcpy(index, scratch, (size_t)n * sizeof(int32_t));
  }
}

/* IoU(a, b) > overlap (Everingham et al. 2010), as intersectionOverUnion on integer boxes. */
static int rbd_overlaps(const rbd_hit *a, const rbd_hit *b, const rbd_options *options) {
  int64_t ow = (int64_t)(a->x + a->width < b->x + b->width ? a->x + a->width : b->x + b->width) - (a->x > b->x ? a->x : b->x);
  int64_t oh = (int64_t)(a->y + a->height < b->y + b->height ? a->y + a->height : b->y + b->height) - (a->y > b->y ? a->y : b->y);
  int64_t intersection, together;
  if (ow <= 0 || oh <= 0) return 0;
  intersection = ow * oh;
  together = (int64_t)a->width * a->height + (int64_t)b->width * b->height - intersection;
#ifdef RBD_INTEGER
  return together > 0 && intersection * 65536 > (int64_t)options->overlap_q16 * together;
#else
  return (together > 0 ? (double)intersection / (double)together : 0.0) > options->overlap;
#endif
}

static int32_t rbd_root(int32_t *parent, int32_t p) {
  while (parent[p] != p) {
    parent[p] = parent[parent[p]];
    p = parent[p];
  }
  return p;
}

static void rbd_set_box(rbd_detection *d, const rbd_hit *h) {
#ifdef RBD_INTEGER
  d->box[0] = (int64_t)h->x * 256; d->box[1] = (int64_t)h->y * 256;
  d->box[2] = (int64_t)h->width * 256; d->box[3] = (int64_t)h->height * 256;
#else
  d->box[0] = h->x; d->box[1] = h->y; d->box[2] = h->width; d->box[3] = h->height;
#endif
}

/* Greedy non-maximum suppression in score order; support = the hit and those it suppressed. */
static int32_t rbd_merge_nms(rbd_work *w, int32_t n, const rbd_options *options) {
  int32_t *suppressed = w->link, a, b, count = 0;
  for (a = 0; a < n; a++) suppressed[a] = 0;
  for (a = 0; a < n; a++) {
    const rbd_hit *kept = w->hits + w->order[a];
    int32_t support = 1;
    if (suppressed[a]) continue;
    for (b = a + 1; b < n; b++) {
      if (!suppressed[b] && rbd_overlaps(kept, w->hits + w->order[b], options)) { suppressed[b] = 1; support++; }
    }
    rbd_set_box(w->detections + count, kept);
    w->detections[count].score = kept->score;
    w->detections[count].support = support;
    count++;
  }
  return count;
}

/* Groups of hits transitively linked by IoU > overlap (union-find over an
 * x-sorted sweep, rectboost's meanOfGroups with its bounds), each averaged;
 * groups listed in the order of their best hit. */
static int32_t rbd_merge_mean(rbd_work *w, int32_t n, const rbd_options *options) {
  int32_t *by_x = w->by_x, *parent = w->link, *group = w->group, *position = w->scratch;
  int32_t a, b, groups = 0;
  for (a = 0; a < n; a++) by_x[a] = a;
  rbd_sort(by_x, w->scratch, n, w->hits, rbd_left_after);
  for (a = 0; a < n; a++) parent[a] = a;
  for (a = 0; a < n; a++) {
    const rbd_hit *p = w->hits + by_x[a];
    int32_t root_a = rbd_root(parent, a);
#ifdef RBD_INTEGER
    int32_t x_limit = p->x + p->width;
#else
    const double slack = 1 - 1e-9;
    double right = (double)p->x + (double)p->width, bottom = (double)p->y + (double)p->height;
    double x_limit = right - options->overlap * (right - (double)p->x) * slack;
    double y_needed = options->overlap * (bottom - (double)p->y) * slack;
#endif
    for (b = a + 1; b < n && w->hits[by_x[b]].x < x_limit; b++) {
      const rbd_hit *r = w->hits + by_x[b];
      int32_t root_b;
#ifdef RBD_INTEGER
      int32_t low = p->y + p->height < r->y + r->height ? p->y + p->height : r->y + r->height;
      if (low - (p->y > r->y ? p->y : r->y) <= 0) continue;
#else
      double r_bottom = (double)r->y + (double)r->height;
      double low = bottom < r_bottom ? bottom : r_bottom, high = (double)(p->y > r->y ? p->y : r->y);
      if (low - high <= y_needed) continue;
#endif
      root_b = rbd_root(parent, b);
      if (root_a == root_b) continue;
      if (rbd_overlaps(p, r, options)) parent[root_b] = root_a;
    }
  }
  /* group[root position] = group number, numbered in score order. */
  for (a = 0; a < n; a++) { position[by_x[a]] = a; group[a] = -1; }
  for (a = 0; a < n; a++) {
    int32_t hit = w->order[a], root = rbd_root(parent, position[hit]);
    rbd_detection *d;
    if (group[root] < 0) {
      group[root] = groups;
      d = w->detections + groups++;
      d->score = w->hits[hit].score;
      d->support = 0;
      d->box[0] = d->box[1] = d->box[2] = d->box[3] = 0;
    }
    d = w->detections + group[root];
    d->support++;
    d->box[0] = d->box[0] + w->hits[hit].x;
    d->box[1] = d->box[1] + w->hits[hit].y;
    d->box[2] = d->box[2] + w->hits[hit].width;
    d->box[3] = d->box[3] + w->hits[hit].height;
  }
  for (a = 0; a < groups; a++) {
    rbd_detection *d = w->detections + a;
    int k;
    for (k = 0; k < 4; k++) {
#ifdef RBD_INTEGER
      d->box[k] = rbd_divide_rounded(d->box[k] * 256, d->support);
#else
      d->box[k] = d->box[k] / d->support;
#endif
    }
  }
  return groups;
}

/* ---- the scan ---- */

int rbd_detect(const uint8_t *pixels, int32_t width, int32_t height, int32_t row_bytes,
               const rbd_options *options, void *work, size_t work_bytes, int32_t hit_capacity,
               rbd_result *result) {
  rbd_work w;
  size_t stride = (size_t)width + 1u;
  int32_t k, hits = 0, count, i, kept;
  uint64_t windows = 0;
#ifdef RBD_INTEGER
  uint64_t scale_q32 = (uint64_t)1 << 32;
  if (options->scale_step_q16 <= 65536u || options->scale_step_q16 > 4u * 65536u) return RBD_BAD_ARGUMENT;
  if (options->shift_q16 == 0 || options->shift_q16 > 64u * 65536u || options->overlap_q16 > 65536u) return RBD_BAD_ARGUMENT;
#else
  if (!(options->scale_step >= 1.0001 && options->scale_step <= 4)) return RBD_BAD_ARGUMENT;
  if (!(options->shift >= 0.01 && options->shift <= 64) || !(options->overlap >= 0 && options->overlap <= 1)) return RBD_BAD_ARGUMENT;
#endif
  if (pixels == NULL || work == NULL || result == NULL || row_bytes < width) return RBD_BAD_ARGUMENT;
  if (options->merge < RBD_MERGE_NMS || options->merge > RBD_MERGE_NONE || options->min_support < 1) return RBD_BAD_ARGUMENT;
  if (options->smallest_side < 0 || options->largest_side < 0) return RBD_BAD_ARGUMENT;
  if (rbd_work_bytes(width, height, hit_capacity) == 0) return RBD_BAD_ARGUMENT;
  if (work_bytes < rbd_work_bytes(width, height, hit_capacity)) return RBD_WORK_TOO_SMALL;
  rbd_carve(&w, work, stride * ((size_t)height + 1u), stride, hit_capacity);
  rbd_integrate(pixels, width, height, row_bytes, w.sum, w.squared);
#if RBD_TILTED
  rbd_rotate(pixels, width, height, row_bytes, w.sum + stride * ((size_t)height + 1u), w.rays);
#endif

  /* Scales s = step^k while the rounded window fits the image (scanScales). */
  for (k = 0;; k++) {
    int32_t window_width, window_height, step, x, y;
#ifdef RBD_INTEGER
    uint64_t count_of_pixels;
    if (k > 0) scale_q32 = (scale_q32 * options->scale_step_q16 + 0x8000u) >> 16;
    window_width = rbd_round_q32((uint64_t)RBD_WINDOW_WIDTH * scale_q32);
    window_height = rbd_round_q32((uint64_t)RBD_WINDOW_HEIGHT * scale_q32);
#else
    double scale = pow(options->scale_step, (double)k), inverse_count;
    window_width = (int32_t)rbd_round(RBD_WINDOW_WIDTH * scale);
    window_height = (int32_t)rbd_round(RBD_WINDOW_HEIGHT * scale);
#endif
    if (window_width > width || window_height > height) break;
    if (options->largest_side > 0 && (window_width > window_height ? window_width : window_height) > options->largest_side) break;
    if (options->smallest_side > 0 && (window_width < window_height ? window_width : window_height) < options->smallest_side) continue;
#ifdef RBD_INTEGER
    count_of_pixels = (uint64_t)window_width * (uint64_t)window_height;
    if (count_of_pixels > RBD_MAX_WINDOW_PIXELS) break;
    step = (int32_t)(((uint64_t)options->shift_q16 * scale_q32 + ((uint64_t)1 << 47)) >> 48);
    if (step < 1) step = 1;
    rbd_compile_scale(&w, scale_q32, stride, stride * ((size_t)height + 1u), window_width, window_height);
#else
    step = (int32_t)rbd_round(options->shift * scale);
    if (step < 1) step = 1;
    inverse_count = 1.0 / ((double)window_width * (double)window_height);
    rbd_compile_scale(&w, scale, stride, stride * ((size_t)height + 1u), window_width, window_height);
#endif
    {
      int32_t bottom_right = window_height * (int32_t)stride + window_width, bottom_left = window_height * (int32_t)stride;
      for (y = 0; y + window_height <= height; y += step) {
        for (x = 0; x + window_width <= width; x += step) {
          rbd_score score = 0;
          windows++;
#ifdef RBD_INTEGER
          if (!rbd_window(&w, (size_t)y * stride + (size_t)x, bottom_right, bottom_left, window_width, count_of_pixels, &score)) continue;
#else
          if (!rbd_window(&w, (size_t)y * stride + (size_t)x, bottom_right, bottom_left, window_width, inverse_count, &score)) continue;
#endif
          if (hits == hit_capacity) return RBD_TOO_MANY_HITS;
          w.hits[hits].x = x;
          w.hits[hits].y = y;
          w.hits[hits].width = window_width;
          w.hits[hits].height = window_height;
          w.hits[hits].score = score;
          hits++;
        }
      }
    }
  }

  for (i = 0; i < hits; i++) w.order[i] = i;
  rbd_sort(w.order, w.scratch, hits, w.hits, rbd_after);
  if (options->merge == RBD_MERGE_NMS) {
    count = rbd_merge_nms(&w, hits, options);
  } else if (options->merge == RBD_MERGE_MEAN) {
    count = rbd_merge_mean(&w, hits, options);
  } else {
    for (i = 0; i < hits; i++) {
      rbd_set_box(w.detections + i, w.hits + w.order[i]);
      w.detections[i].score = w.hits[w.order[i]].score;
      w.detections[i].support = 1;
    }
    count = hits;
  }
  for (i = kept = 0; i < count; i++) {
    if (w.detections[i].support >= options->min_support) w.detections[kept++] = w.detections[i];
  }
  result->detections = w.detections;
  result->detection_count = kept;
  result->hit_count = hits;
  result->windows_scanned = windows;
  return RBD_OK;
}
