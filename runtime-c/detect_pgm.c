/*
 * detect_pgm: runs the exported detector on binary PGM files (P5, maxval 255)
 * and prints one JSON line per image in the layout of `rectboost detect`:
 *   {"version":1,"image":...,"width":...,"height":...,"detections":[{"box":[x,y,w,h],"score":s,"support":n}],
 *    "windowsScanned":n,"milliseconds":t}
 * Numbers are written as JavaScript writes them (shortest form that reads back
 * to the same double), so the float build's lines equal the CLI's byte for byte.
 * --no-timing leaves "milliseconds" out (as `rectboost detect --no-timing`).
 *
 * Build: cc -std=c99 -O2 -ffp-contract=off detect_pgm.c rectboost_detector.c -lm
 *   (add -DRBD_INTEGER to both for the integer build).
 * This program is for PCs: it uses malloc and stdio; the detector itself does not.
 */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "rectboost_detector.h"

static const char *program = "detect_pgm";

static int fail(const char *image, const char *message) {
  fprintf(stderr, "%s: %s: %s\n", program, image, message);
  return 1;
}

/* Reads one header number after optional white space and # comments; -1 when there is none. */
static long read_header_number(FILE *file) {
  int c = fgetc(file);
  long value = 0;
  int digits = 0;
  for (;;) {
    while (c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\v' || c == '\f') c = fgetc(file);
    if (c != '#') break;
    while (c != '\n' && c != EOF) c = fgetc(file);
  }
  while (c >= '0' && c <= '9') {
    if (value > 100000000L) return -1;
    value = value * 10 + (c - '0');
    digits++;
    c = fgetc(file);
  }
  if (digits == 0) return -1;
  /* exactly one white-space character ends the header's last number */
  if (!(c == ' ' || c == '\t' || c == '\n' || c == '\r')) return -1;
  return value;
}

/* Loads a P5 PGM; returns NULL after printing why. */
static uint8_t *read_pgm(const char *path, int32_t *width, int32_t *height) {
  FILE *file = fopen(path, "rb");
  long w, h, maxval;
  uint8_t *pixels;
  size_t bytes;
  char message[256];
  if (file == NULL) {
    snprintf(message, sizeof message, "cannot be opened (%s); pass a readable binary PGM (P5) file", strerror(errno));
    fail(path, message);
    return NULL;
  }
  if (fgetc(file) != 'P' || fgetc(file) != '5') {
    fclose(file);
    fail(path, "expected a binary PGM file starting with P5; received another header. Convert the image to 8-bit binary PGM");
    return NULL;
  }
  w = read_header_number(file);
  h = read_header_number(file);
  maxval = read_header_number(file);
  if (w < 0 || h < 0 || maxval < 0) {
    fclose(file);
    fail(path, "the PGM header is malformed (expected width, height and maxval as decimal numbers)");
    return NULL;
  }
  if (w == 0 || h == 0) {
    fclose(file);
    fail(path, "the image has zero width or height; pass an image of at least one pixel");
    return NULL;
  }
  if (maxval != 255) {
    fclose(file);
    snprintf(message, sizeof message, "expected maxval 255 (8-bit gray); received %ld", maxval);
    fail(path, message);
    return NULL;
  }
  if ((unsigned long)w * (unsigned long)h > RBD_MAX_IMAGE_PIXELS || w > 1L << 26 || h > 1L << 26) {
    fclose(file);
    snprintf(message, sizeof message, "the image is %ld x %ld pixels, above this detector's limit of %lu pixels; shrink it", w, h, (unsigned long)RBD_MAX_IMAGE_PIXELS);
    fail(path, message);
    return NULL;
  }
  bytes = (size_t)w * (size_t)h;
  pixels = (uint8_t *)malloc(bytes);
  if (pixels == NULL) {
    fclose(file);
    fail(path, "not enough memory for the pixels");
    return NULL;
  }
  if (fread(pixels, 1, bytes, file) != bytes) {
    free(pixels);
    fclose(file);
    snprintf(message, sizeof message, "the file is truncated: expected %lu pixel bytes after the header", (unsigned long)bytes);
    fail(path, message);
    return NULL;
  }
  fclose(file);
  *width = (int32_t)w;
  *height = (int32_t)h;
  return pixels;
}

/* Writes a double as JavaScript's Number.prototype.toString does: the fewest
 * significant digits that read back to the same value (C's correctly rounded
 * printf and strtod), then plain or exponent notation by JavaScript's rules. */
static void print_number(double v) {
  char text[40], digits[24];
  int precision, count = 0, exponent, i;
  const char *p;
  if (v == 0) { fputs("0", stdout); return; }
  for (precision = 1; precision <= 17; precision++) {
    snprintf(text, sizeof text, "%.*e", precision - 1, v);
    if (strtod(text, NULL) == v) break;
  }
  p = text;
  if (*p == '-') { fputc('-', stdout); p++; }
  for (; *p != 'e'; p++) if (*p != '.') digits[count++] = *p;
  while (count > 1 && digits[count - 1] == '0') count--;
  digits[count] = '\0';
  exponent = atoi(p + 1) + 1; /* value = 0.digits x 10^exponent */
  if (count <= exponent && exponent <= 21) {
    fputs(digits, stdout);
    for (i = count; i < exponent; i++) fputc('0', stdout);
  } else if (0 < exponent && exponent <= 21) {
    fwrite(digits, 1, (size_t)exponent, stdout);
    fputc('.', stdout);
    fputs(digits + exponent, stdout);
  } else if (-6 < exponent && exponent <= 0) {
    fputs("0.", stdout);
    for (i = 0; i < -exponent; i++) fputc('0', stdout);
    fputs(digits, stdout);
  } else {
    fputc(digits[0], stdout);
    if (count > 1) { fputc('.', stdout); fputs(digits + 1, stdout); }
    fprintf(stdout, "e%c%d", exponent - 1 < 0 ? '-' : '+', abs(exponent - 1));
  }
}

/* A JSON string as JSON.stringify writes it. */
static void print_string(const char *s) {
  fputc('"', stdout);
  for (; *s != '\0'; s++) {
    unsigned char c = (unsigned char)*s;
    if (c == '"') fputs("\\\"", stdout);
    else if (c == '\\') fputs("\\\\", stdout);
    else if (c == '\b') fputs("\\b", stdout);
    else if (c == '\f') fputs("\\f", stdout);
    else if (c == '\n') fputs("\\n", stdout);
    else if (c == '\r') fputs("\\r", stdout);
    else if (c == '\t') fputs("\\t", stdout);
    else if (c < 0x20) fprintf(stdout, "\\u%04x", c);
    else fputc(c, stdout);
  }
  fputc('"', stdout);
}

static int parse_number(const char *name, const char *text, double low, double high, double *out) {
  char *end;
  double v = strtod(text, &end);
  if (end == text || *end != '\0' || !(v >= low && v <= high)) {
    fprintf(stderr, "%s: option %s expects a number in [%g, %g]; received \"%s\"\n", program, name, low, high, text);
    return 0;
  }
  *out = v;
  return 1;
}

static void usage(void) {
  fprintf(stderr,
          "usage: %s [--scale-step R] [--shift P] [--smallest PX] [--largest PX] [--merge nms|mean|none]\n"
          "          [--overlap IOU] [--min-support N] [--no-timing] [--repeat N] IMAGE.pgm...\n"
          "       %s --footprint WIDTH HEIGHT HITS   (bytes of tables and of work memory)\n",
          program, program);
}

int main(int argc, char **argv) {
  rbd_options options = rbd_default_options();
  double scale_step = 1.25, shift = 1, overlap = 0.3, value;
  int timing = 1, repeat = 1, first_image = 0, status = 0, i;
  for (i = 1; i < argc; i++) {
    const char *a = argv[i];
    if (strcmp(a, "--no-timing") == 0) { timing = 0; continue; }
    if (strcmp(a, "--footprint") == 0 && i + 3 < argc) {
      printf("{\"tableBytes\":%lu,\"workBytes\":%lu}\n", (unsigned long)rbd_table_bytes(),
             (unsigned long)rbd_work_bytes((int32_t)atol(argv[i + 1]), (int32_t)atol(argv[i + 2]), (int32_t)atol(argv[i + 3])));
      return 0;
    }
    if (a[0] != '-' || a[1] != '-') { first_image = i; break; }
    if (i + 1 >= argc) { usage(); return 2; }
    if (strcmp(a, "--scale-step") == 0) { if (!parse_number(a, argv[++i], 1.0001, 4, &scale_step)) return 2; }
    else if (strcmp(a, "--shift") == 0) { if (!parse_number(a, argv[++i], 0.01, 64, &shift)) return 2; }
    else if (strcmp(a, "--overlap") == 0) { if (!parse_number(a, argv[++i], 0, 1, &overlap)) return 2; }
    else if (strcmp(a, "--smallest") == 0) { if (!parse_number(a, argv[++i], 1, 1 << 26, &value)) return 2; options.smallest_side = (int32_t)value; }
    else if (strcmp(a, "--largest") == 0) { if (!parse_number(a, argv[++i], 1, 1 << 26, &value)) return 2; options.largest_side = (int32_t)value; }
    else if (strcmp(a, "--min-support") == 0) { if (!parse_number(a, argv[++i], 1, 1000000, &value)) return 2; options.min_support = (int32_t)value; }
    else if (strcmp(a, "--repeat") == 0) { if (!parse_number(a, argv[++i], 1, 1000000, &value)) return 2; repeat = (int)value; }
    else if (strcmp(a, "--merge") == 0) {
      const char *m = argv[++i];
      if (strcmp(m, "nms") == 0) options.merge = RBD_MERGE_NMS;
      else if (strcmp(m, "mean") == 0) options.merge = RBD_MERGE_MEAN;
      else if (strcmp(m, "none") == 0) options.merge = RBD_MERGE_NONE;
      else { fprintf(stderr, "%s: option --merge expects nms, mean or none; received \"%s\"\n", program, m); return 2; }
    } else { fprintf(stderr, "%s: unknown option %s\n", program, a); usage(); return 2; }
  }
  if (first_image == 0) { usage(); return 2; }
#ifdef RBD_INTEGER
  options.scale_step_q16 = (uint32_t)(scale_step * 65536 + 0.5);
  options.shift_q16 = (uint32_t)(shift * 65536 + 0.5);
  options.overlap_q16 = (uint32_t)(overlap * 65536 + 0.5);
#else
  options.scale_step = scale_step;
  options.shift = shift;
  options.overlap = overlap;
#endif
  for (i = first_image; i < argc; i++) {
    int32_t width = 0, height = 0, capacity = 65536, d, run;
    uint8_t *pixels = read_pgm(argv[i], &width, &height);
    void *work = NULL;
    rbd_result result;
    int code = RBD_TOO_MANY_HITS;
    clock_t start = 0;
    double milliseconds;
    if (pixels == NULL) { status = 1; continue; }
    /* The detector never allocates; this program grows the hit capacity until the hits fit. */
    while (code == RBD_TOO_MANY_HITS) {
      size_t bytes = rbd_work_bytes(width, height, capacity);
      free(work);
      work = bytes == 0 ? NULL : malloc(bytes);
      if (work == NULL) { code = -1; break; }
      start = clock();
      for (run = 0; run < repeat; run++) {
        code = rbd_detect(pixels, width, height, width, &options, work, bytes, capacity, &result);
        if (code != RBD_OK) break;
      }
      if (code == RBD_TOO_MANY_HITS) {
        if (capacity > (1 << 28)) { code = -1; break; }
        capacity *= 4;
      }
    }
    milliseconds = (double)(clock() - start) * 1000.0 / CLOCKS_PER_SEC / repeat;
    if (code != RBD_OK) {
      fail(argv[i], code == -1 ? "not enough memory for the scan" : "the detector refused the image or the options");
      free(work);
      free(pixels);
      status = 1;
      continue;
    }
    printf("{\"version\":1,\"image\":");
    print_string(argv[i]);
    printf(",\"width\":%ld,\"height\":%ld,\"detections\":[", (long)width, (long)height);
    for (d = 0; d < result.detection_count; d++) {
      const rbd_detection *r = result.detections + d;
      int k;
      printf(d == 0 ? "{\"box\":[" : ",{\"box\":[");
      for (k = 0; k < 4; k++) {
        if (k > 0) fputc(',', stdout);
#ifdef RBD_INTEGER
        print_number((double)r->box[k] / 256.0);
#else
        print_number(r->box[k]);
#endif
      }
      printf("],\"score\":");
#ifdef RBD_INTEGER
      print_number((double)r->score / (double)(1L << RBD_VOTE_BITS));
#else
      print_number(r->score);
#endif
      printf(",\"support\":%ld}", (long)r->support);
    }
    printf("],\"windowsScanned\":%lu", (unsigned long)result.windows_scanned);
    if (timing) {
      printf(",\"milliseconds\":");
      print_number((double)(long)(milliseconds * 100 + 0.5) / 100);
    }
    printf("}\n");
    free(work);
    free(pixels);
  }
  return status;
}
