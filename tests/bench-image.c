/* bench-image.c: prints the time to open a large 16-bit DICOM radiograph
 * and to draw window, pan and zoom frames over it.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A benchmark, not a test: it never fails on a slow machine.  It writes an
 * invented 3000 x 2500 16-bit MONOCHROME2 DICOM file (explicit VR little
 * endian, a ramp with fine detail) into a temporary folder, then times:
 *  - opening it as the window does off the main thread: reading and
 *    decoding (hl_gray_image_load), the halved copies (the underlay) and
 *    the SHA-256 of the file; best of BENCH_OPEN_RUNS (target <= 0.5 s);
 *  - frames of a 1280 x 800 canvas: a window/level drag (the window
 *    changes every frame), pan and zoom; fitted (a halved copy on screen)
 *    and at one image pixel a screen pixel (the full image); median and
 *    95th percentile (target median <= 8 ms).
 */
#include "config.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "hl-gray-image.h"
#include "hl-image.h"
#include "hl-underlay.h"

#define BENCH_COLS 3000
#define BENCH_ROWS 2500
#define BENCH_OPEN_RUNS 3
#define BENCH_FRAMES 120
#define CANVAS_W 1280
#define CANVAS_H 800
#define MM_PER_PX 0.12
#define OPEN_TARGET_S 0.5
#define FRAME_TARGET_MS 8.0

static double
now_s (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return ts.tv_sec + ts.tv_nsec * 1e-9;
}

static void
put_element (FILE *f, uint16_t g, uint16_t e, const char *vr, const void *val, uint32_t len)
{
  fwrite (&g, 2, 1, f);
  fwrite (&e, 2, 1, f);
  fwrite (vr, 1, 2, f);
  if (strcmp (vr, "OB") == 0 || strcmp (vr, "OW") == 0)
    {
      uint16_t zero = 0;
      fwrite (&zero, 2, 1, f);
      fwrite (&len, 4, 1, f);
    }
  else
    {
      uint16_t l16 = (uint16_t) len;
      fwrite (&l16, 2, 1, f);
    }
  fwrite (val, 1, len, f);
}

static void
put_string (FILE *f, uint16_t g, uint16_t e, const char *vr, const char *s)
{
  char buf[80];
  size_t n = strlen (s);
  memcpy (buf, s, n);
  if (n % 2)
    buf[n++] = strcmp (vr, "UI") == 0 ? '\0' : ' ';
  put_element (f, g, e, vr, buf, (uint32_t) n);
}

static void
put_us (FILE *f, uint16_t g, uint16_t e, uint16_t v)
{
  put_element (f, g, e, "US", &v, 2);
}

/* Little-endian hosts only (as the element lengths above). */
static int
write_dicom (const char *path)
{
  FILE *f = fopen (path, "wb");
  if (f == NULL)
    return -1;
  char pre[128] = { 0 };
  fwrite (pre, 1, 128, f);
  fwrite ("DICM", 1, 4, f);
  const char *ts = "1.2.840.10008.1.2.1", *sop = "1.2.840.10008.5.1.4.1.1.1.1";
  uint32_t meta_len = (uint32_t) (12 + 2 + (8 + 28) + (8 + 16) + (8 + 20) + (8 + 8));
  put_element (f, 0x0002, 0x0000, "UL", &meta_len, 4);
  put_element (f, 0x0002, 0x0001, "OB", "\0\1", 2);
  put_string (f, 0x0002, 0x0002, "UI", sop);
  put_string (f, 0x0002, 0x0003, "UI", "2.25.12345678901");
  put_string (f, 0x0002, 0x0010, "UI", ts);
  put_string (f, 0x0002, 0x0012, "UI", "2.25.99");
  put_string (f, 0x0008, 0x0016, "UI", sop);
  put_string (f, 0x0018, 0x1164, "DS", "0.15\\0.15");
  put_us (f, 0x0028, 0x0002, 1);
  put_string (f, 0x0028, 0x0004, "CS", "MONOCHROME2");
  put_us (f, 0x0028, 0x0010, BENCH_ROWS);
  put_us (f, 0x0028, 0x0011, BENCH_COLS);
  put_us (f, 0x0028, 0x0100, 16);
  put_us (f, 0x0028, 0x0101, 16);
  put_us (f, 0x0028, 0x0102, 15);
  put_us (f, 0x0028, 0x0103, 0);
  size_t n = (size_t) BENCH_ROWS * BENCH_COLS;
  uint16_t *px = malloc (n * sizeof *px);
  if (px == NULL)
    {
      fclose (f);
      return -1;
    }
  for (int y = 0; y < BENCH_ROWS; y++)
    for (int x = 0; x < BENCH_COLS; x++)
      px[(size_t) y * BENCH_COLS + x] =
        (uint16_t) (8000 + (40000 * x) / BENCH_COLS + ((x ^ y) & 511));
  put_element (f, 0x7fe0, 0x0010, "OW", px, (uint32_t) (n * 2));
  free (px);
  return fclose (f) == 0 ? 0 : -1;
}

static int
cmp_double (const void *a, const void *b)
{
  double x = *(const double *) a, y = *(const double *) b;
  return (x > y) - (x < y);
}

static void
frames (const char *what, HlUnderlay *ul, double scale, int window_drag, int pan, int zoom)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_RGB24, CANVAS_W, CANVAS_H);
  double ms[BENCH_FRAMES];
  HlVec2 origin = { 0.0, 0.0 };
  double c = 30000, w = 30000;
  for (int i = 0; i < BENCH_FRAMES; i++)
    {
      HlView view = { scale, 0.0, 0.0 };
      double k = zoom ? pow (1.01, i % 60 < 30 ? i % 30 : 30 - i % 30) : 1.0;
      view.scale *= k;
      view.tx = CANVAS_W / 2.0 - BENCH_COLS * MM_PER_PX / 2.0 * view.scale + (pan ? 3.0 * i : 0);
      view.ty = CANVAS_H / 2.0 - BENCH_ROWS * MM_PER_PX / 2.0 * view.scale + (pan ? 1.5 * i : 0);
      double t0 = now_s ();
      if (window_drag)
        hl_underlay_set_window (ul, c + 37.0 * i, w + 53.0 * i, false);
      cairo_t *cr = cairo_create (s);
      cairo_set_source_rgb (cr, 1, 1, 1);
      cairo_paint (cr);
      hl_underlay_draw (ul, cr, &view, origin, MM_PER_PX, 1.0);
      cairo_destroy (cr);
      cairo_surface_flush (s);
      ms[i] = (now_s () - t0) * 1000.0;
    }
  qsort (ms, BENCH_FRAMES, sizeof *ms, cmp_double);
  printf ("%-44s median %6.2f ms, p95 %6.2f ms (target median <= %.0f ms)\n", what,
          ms[BENCH_FRAMES / 2], ms[(int) (0.95 * (BENCH_FRAMES - 1))], FRAME_TARGET_MS);
  cairo_surface_destroy (s);
}

int
main (void)
{
  char dir[] = "/tmp/hl-bench-image-XXXXXX";
  if (mkdtemp (dir) == NULL)
    return EXIT_FAILURE;
  char path[64];
  snprintf (path, sizeof path, "%s/large.dcm", dir);
  if (write_dicom (path) != 0)
    {
      fprintf (stderr, "bench-image: cannot write %s\n", path);
      return EXIT_FAILURE;
    }
  double best_read = INFINITY, best_copies = INFINITY, best_hash = INFINITY,
         best_total = INFINITY;
  HlUnderlay *ul = NULL;
  for (int r = 0; r < BENCH_OPEN_RUNS; r++)
    {
      HlError err = { 0 };
      double t0 = now_s ();
      HlGrayImage *img = hl_gray_image_load (path, &err);
      double t1 = now_s ();
      if (img == NULL)
        {
          fprintf (stderr, "bench-image: %s\n", err.message);
          return EXIT_FAILURE;
        }
      HlUnderlay *u = hl_underlay_new_from_gray (img);
      double t2 = now_s ();
      char hex[65];
      if (hl_file_sha256_hex (path, hex, &err) != HL_OK)
        {
          fprintf (stderr, "bench-image: %s\n", err.message);
          return EXIT_FAILURE;
        }
      double t3 = now_s ();
      best_read = fmin (best_read, t1 - t0);
      best_copies = fmin (best_copies, t2 - t1);
      best_hash = fmin (best_hash, t3 - t2);
      best_total = fmin (best_total, t3 - t0);
      hl_underlay_free (ul);
      ul = u;
    }
  printf ("bench-image: %d x %d 16-bit DICOM, %s\n", BENCH_COLS, BENCH_ROWS,
          hl_dicom_available () ? "read through GDCM" : "DICOM not available in this build");
  printf ("open (best of %d): read and decode %.3f s, halved copies %.3f s, SHA-256 %.3f s, "
          "total %.3f s (target <= %.1f s)\n", BENCH_OPEN_RUNS, best_read, best_copies,
          best_hash, best_total, OPEN_TARGET_S);
  double fit = fmin (CANVAS_W / (BENCH_COLS * MM_PER_PX), CANVAS_H / (BENCH_ROWS * MM_PER_PX));
  frames ("window/level drag, fitted:", ul, fit, 1, 0, 0);
  frames ("window/level drag, 1 image px a screen px:", ul, 1.0 / MM_PER_PX, 1, 0, 0);
  frames ("pan, fitted:", ul, fit, 0, 1, 0);
  frames ("pan and zoom, 1 image px a screen px:", ul, 1.0 / MM_PER_PX, 0, 1, 1);
  hl_underlay_free (ul);
  unlink (path);
  rmdir (dir);
  return EXIT_SUCCESS;
}
