/* test-image.c: the image entry point and the calibration a file carries.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every DICOM file here is made at test time, into a temporary folder, by
 * tests/make-dicom.py (an invented ramp with bright discs at known pixels
 * and invented identifying elements) and compressed with GDCM's gdcmconv
 * (RLE, JPEG lossless, JPEG 2000).  PNG and TIFF files are written with
 * libpng and libtiff.  Checked:
 *  - each calibration source of the precedence (hl-gray-image.h), the
 *    mm per pixel within 1e-6;
 *  - every encoding x MONOCHROME1/2 x 8, 12, 16 bits gives the pixels of
 *    the uncompressed MONOCHROME2 file exactly (lossless), bone white, and
 *    the distance between the discs within 0.5 mm of the drawn one;
 *  - rescale, window presets, frames, colour, burned-in annotation;
 *  - each bad input gets a message naming the problem;
 *  - 16-bit PNG and TIFF keep their depth (32000 stays 32000);
 *  - nothing identifying is in what the reader returns;
 *  - a DICOM reader that hangs (a test hook makes the reading child
 *    sleep) is stopped at the time limit HIPLEVER_DICOM_TIMEOUT sets, with
 *    a message, and the child is reaped.
 */
#define _GNU_SOURCE   /* memmem */
#include "config.h"

#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <errno.h>
#include <string.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include <png.h>
#include <tiffio.h>

#include "hl-gray-image.h"
#include "hl-image-ref.h"

#define N_OF(a) (sizeof (a) / sizeof (a)[0])
#define TOL_SPACING 1e-6        /* the brief: calibration read within 1e-6 */
#define TOL_MEASURE_MM 0.5      /* the brief: measures within 0.5 mm */
#define CMD_MAX 2048

static char tmpdir[256];

static const char *
tmp_path (const char *name)
{
  static char buf[4][512];
  static int next;
  char *b = buf[next++ % 4];
  snprintf (b, 512, "%s/%s", tmpdir, name);
  return b;
}

/* Writes NAME with make-dicom.py ARGS; `codec` (NULL, "rle", "jpeg",
 * "j2k") compresses it with gdcmconv. */
static const char *
make_dicom (const char *name, const char *codec, const char *args)
{
  char cmd[CMD_MAX];
  const char *out = tmp_path (name);
  const char *raw = codec ? tmp_path ("raw-before-codec.dcm") : out;
  snprintf (cmd, sizeof cmd, "python3 '%s' '%s' %s", HL_TEST_MAKE_DICOM, raw, args);
  ck_assert_msg (system (cmd) == 0, "failed: %s", cmd);
  if (codec != NULL)
    {
      snprintf (cmd, sizeof cmd, "'%s' --%s '%s' '%s'", HL_TEST_GDCMCONV, codec, raw, out);
      ck_assert_msg (system (cmd) == 0, "failed: %s", cmd);
    }
  return out;
}

static HlGrayImage *
load_ok (const char *path)
{
  HlError err = { 0 };
  HlGrayImage *img = hl_gray_image_load (path, &err);
  ck_assert_msg (img != NULL, "%s: %s", path, err.message);
  return img;
}

/* ---- Calibration precedence, pure --------------------------------------- */

typedef struct {
  const char *name;
  HlFileSpacing in;
  HlSpacingSource source;
  double mm_per_pixel;
  double magnification;
  bool assumed;
} ChooseCase;

static const ChooseCase choose_cases[] = {
  { "nothing", { 0 }, HL_SPACING_NONE, 0, 1.0, false },
  { "calibrated pixel spacing",
    { .has_pixel_spacing = true, .pixel_spacing_mm = 0.143, .pixel_spacing_calibrated = true },
    HL_SPACING_PIXEL, 0.143, 1.0, false },
  { "calibrated pixel spacing before imager spacing and ERMF",
    { .has_pixel_spacing = true, .pixel_spacing_mm = 0.143, .pixel_spacing_calibrated = true,
      .has_imager_spacing = true, .imager_spacing_mm = 0.15,
      .has_magnification = true, .magnification = 1.25 },
    HL_SPACING_PIXEL, 0.143, 1.0, false },
  { "imager spacing / ERMF",
    { .has_imager_spacing = true, .imager_spacing_mm = 0.15,
      .has_magnification = true, .magnification = 1.25 },
    HL_SPACING_IMAGER_ERMF, 0.12, 1.25, false },
  { "imager spacing / 1.20",
    { .has_imager_spacing = true, .imager_spacing_mm = 0.168 },
    HL_SPACING_IMAGER_DEFAULT, 0.14, 1.2, true },
  { "uncalibrated pixel spacing stands for imager spacing, ERMF",
    { .has_pixel_spacing = true, .pixel_spacing_mm = 0.11,
      .has_magnification = true, .magnification = 1.1 },
    HL_SPACING_IMAGER_ERMF, 0.1, 1.1, false },
  { "uncalibrated pixel spacing stands for imager spacing, 1.20",
    { .has_pixel_spacing = true, .pixel_spacing_mm = 0.144 },
    HL_SPACING_IMAGER_DEFAULT, 0.12, 1.2, true },
  { "imager spacing before uncalibrated pixel spacing",
    { .has_pixel_spacing = true, .pixel_spacing_mm = 0.2,
      .has_imager_spacing = true, .imager_spacing_mm = 0.15,
      .has_magnification = true, .magnification = 1.2 },
    HL_SPACING_IMAGER_ERMF, 0.125, 1.2, false },
  { "ERMF exactly 1.0", { .has_imager_spacing = true, .imager_spacing_mm = 0.1,
      .has_magnification = true, .magnification = 1.0 },
    HL_SPACING_IMAGER_ERMF, 0.1, 1.0, false },
  { "ERMF exactly 1.5", { .has_imager_spacing = true, .imager_spacing_mm = 0.15,
      .has_magnification = true, .magnification = 1.5 },
    HL_SPACING_IMAGER_ERMF, 0.1, 1.5, false },
};

START_TEST (test_choose)
{
  const ChooseCase *c = &choose_cases[_i];
  HlSpacingChoice out;
  HlError err = { 0 };
  ck_assert_msg (hl_spacing_choose (&c->in, &out, &err) == HL_OK, "%s: %s", c->name,
                 err.message);
  ck_assert_msg (out.source == c->source, "%s: source %s", c->name,
                 hl_spacing_source_name (out.source));
  ck_assert_double_eq_tol (out.mm_per_pixel, c->mm_per_pixel, TOL_SPACING);
  ck_assert_double_eq_tol (out.magnification, c->magnification, TOL_SPACING);
  ck_assert (out.assumed == c->assumed);
  HlSpacingSource back;
  ck_assert (hl_spacing_source_from_name (hl_spacing_source_name (c->source), &back));
  ck_assert (back == c->source);
}
END_TEST

typedef struct {
  HlFileSpacing in;
  const char *mentions;
} ChooseBad;

static const ChooseBad choose_bad[] = {
  { { .has_imager_spacing = true, .imager_spacing_mm = 0.15,
      .has_magnification = true, .magnification = 0.95 }, "0.95" },
  { { .has_imager_spacing = true, .imager_spacing_mm = 0.15,
      .has_magnification = true, .magnification = 1.6 }, "1.6" },
  { { .has_imager_spacing = true, .imager_spacing_mm = 0.15,
      .has_magnification = true, .magnification = NAN }, "magnification" },
  { { .has_pixel_spacing = true, .pixel_spacing_mm = 0.0, .pixel_spacing_calibrated = true },
    "Pixel Spacing" },
  { { .has_pixel_spacing = true, .pixel_spacing_mm = -0.1 }, "Pixel Spacing" },
  { { .has_imager_spacing = true, .imager_spacing_mm = INFINITY }, "Imager Pixel Spacing" },
  { { .has_imager_spacing = true, .imager_spacing_mm = 5.0 }, "Imager Pixel Spacing" },
};

START_TEST (test_choose_bad)
{
  HlSpacingChoice out;
  HlError err = { 0 };
  ck_assert (hl_spacing_choose (&choose_bad[_i].in, &out, &err) != HL_OK);
  ck_assert_msg (strstr (err.message, choose_bad[_i].mentions) != NULL, "%s", err.message);
}
END_TEST

/* ---- Calibration read from DICOM files ---------------------------------- */

typedef struct {
  const char *args;
  HlSpacingSource source;
  double mm_per_pixel;
} FileCase;

static const FileCase file_cases[] = {
  { "--pixel-spacing '0.143\\0.143' --calibration-type GEOMETRY", HL_SPACING_PIXEL, 0.143 },
  { "--pixel-spacing '0.143\\0.143' --calibration-type FIDUCIAL "
    "--imager-spacing '0.15\\0.15' --ermf 1.25", HL_SPACING_PIXEL, 0.143 },
  { "--imager-spacing '0.15\\0.15' --ermf 1.25", HL_SPACING_IMAGER_ERMF, 0.12 },
  { "--imager-spacing '0.139\\0.139' --ermf 1.173", HL_SPACING_IMAGER_ERMF, 0.139 / 1.173 },
  { "--imager-spacing '0.168\\0.168'", HL_SPACING_IMAGER_DEFAULT, 0.14 },
  { "--pixel-spacing '0.11\\0.11' --ermf 1.1", HL_SPACING_IMAGER_ERMF, 0.1 },
  { "--pixel-spacing '0.144\\0.144'", HL_SPACING_IMAGER_DEFAULT, 0.12 },
  { "--pixel-spacing '0.2\\0.2' --imager-spacing '0.15\\0.15' --ermf 1.2",
    HL_SPACING_IMAGER_ERMF, 0.125 },
  { "", HL_SPACING_NONE, 0.0 },
};

START_TEST (test_file_calibration)
{
  const FileCase *c = &file_cases[_i];
  HlGrayImage *img = load_ok (make_dicom ("cal.dcm", NULL, c->args));
  HlSpacingChoice sc;
  ck_assert (hl_spacing_choose (&img->spacing, &sc, NULL) == HL_OK);
  ck_assert_msg (sc.source == c->source, "%s: %s", c->args, hl_spacing_source_name (sc.source));
  ck_assert_double_eq_tol (sc.mm_per_pixel, c->mm_per_pixel, TOL_SPACING);
  hl_gray_image_free (img);
}
END_TEST

/* ---- Encodings, photometric, bits --------------------------------------- */

#define GEO_ROWS 150
#define GEO_COLS 190
#define GEO_SPACING_ARGS "--imager-spacing '0.15\\0.15' --ermf 1.25"
#define GEO_MM_PER_PIXEL 0.12
static const double disc_a[2] = { 30, 40 }, disc_b[2] = { 160, 110 };

static const char *const codecs[] = { NULL, "rle", "jpeg", "j2k" };
static const char *const photometrics[] = { "MONOCHROME2", "MONOCHROME1" };
static const int bit_depths[] = { 8, 12, 16 };

/* Centroid of the held values at or above `level` within 12 px of (x, y). */
static void
centroid (const HlGrayImage *img, const double at[2], int level, double out[2])
{
  double sx = 0, sy = 0, n = 0;
  for (int y = (int) at[1] - 12; y <= (int) at[1] + 12; y++)
    for (int x = (int) at[0] - 12; x <= (int) at[0] + 12; x++)
      if (img->pixels[(size_t) y * img->width + x] >= level)
        {
          sx += x;
          sy += y;
          n++;
        }
  ck_assert (n > 0);
  out[0] = sx / n;
  out[1] = sy / n;
}

START_TEST (test_encodings)
{
  int bits = bit_depths[_i % 3];
  const char *pi = photometrics[(_i / 3) % 2];
  const char *codec = codecs[_i / 6];
  char args[512];
  snprintf (args, sizeof args,
            "--rows %d --cols %d --bits %d --photometric %s --disc %g,%g --disc %g,%g "
            "--radius 4 " GEO_SPACING_ARGS, GEO_ROWS, GEO_COLS, bits, pi,
            disc_a[0], disc_a[1], disc_b[0], disc_b[1]);
  char ref_args[512];
  snprintf (ref_args, sizeof ref_args,
            "--rows %d --cols %d --bits %d --photometric MONOCHROME2 --disc %g,%g "
            "--disc %g,%g --radius 4", GEO_ROWS, GEO_COLS, bits,
            disc_a[0], disc_a[1], disc_b[0], disc_b[1]);
  HlGrayImage *ref = load_ok (make_dicom ("ref.dcm", NULL, ref_args));
  HlGrayImage *img = load_ok (make_dicom ("enc.dcm", codec, args));
  ck_assert_int_eq (img->width, GEO_COLS);
  ck_assert_int_eq (img->height, GEO_ROWS);
  ck_assert_int_eq (img->bits, bits);
  ck_assert_str_eq (img->photometric, pi);
  ck_assert (img->turned_over == (strcmp (pi, "MONOCHROME1") == 0));
  ck_assert_msg (memcmp (img->pixels, ref->pixels,
                         (size_t) GEO_ROWS * GEO_COLS * sizeof *img->pixels) == 0,
                 "%s %s %d bits: pixels differ from the uncompressed MONOCHROME2 file",
                 codec ? codec : "raw", pi, bits);
  /* Bone white: the discs are the brightest values. */
  int top = (1 << bits) - 1;
  ck_assert_int_eq (img->pixels[(size_t) disc_a[1] * GEO_COLS + (size_t) disc_a[0]], top);
  HlSpacingChoice sc;
  ck_assert (hl_spacing_choose (&img->spacing, &sc, NULL) == HL_OK);
  ck_assert_double_eq_tol (sc.mm_per_pixel, GEO_MM_PER_PIXEL, TOL_SPACING);
  /* The drawn distance: 130 px, 70 px apart at 0.12 mm a pixel
   * (worked by hand: hypot (130, 70) * 0.12 = 17.717 mm). */
  double a[2], b[2];
  centroid (img, disc_a, top, a);
  centroid (img, disc_b, top, b);
  double measured = hypot (b[0] - a[0], b[1] - a[1]) * sc.mm_per_pixel;
  double drawn = hypot (disc_b[0] - disc_a[0], disc_b[1] - disc_a[1]) * GEO_MM_PER_PIXEL;
  ck_assert_double_eq_tol (drawn, 17.717, 0.001);
  ck_assert_double_eq_tol (measured, drawn, TOL_MEASURE_MM);
  hl_gray_image_free (img);
  hl_gray_image_free (ref);
}
END_TEST

/* ---- Values ------------------------------------------------------------- */

START_TEST (test_rescale_identity)
{
  /* 12 bits, slope 2, intercept 100: held = 2 * stored + 100.  The ramp
   * starts at 0.2 * 4095 = 819 (make-dicom.py). */
  HlGrayImage *img = load_ok (make_dicom ("rs.dcm", NULL, "--bits 12 --slope 2 --intercept 100"));
  ck_assert_int_eq (img->pixels[0], 2 * 819 + 100);
  ck_assert_double_eq (img->value_scale, 1.0);
  hl_gray_image_free (img);
}
END_TEST

START_TEST (test_rescale_mapped)
{
  /* slope 0.5, intercept -1000: values -590.5 .. 1047.5 mapped onto 0..65535. */
  HlGrayImage *img = load_ok (make_dicom ("rs.dcm", NULL,
                                          "--bits 12 --slope 0.5 --intercept -1000 --disc 10,10"));
  ck_assert_double_eq_tol (img->value_offset, 0.5 * 819 - 1000, 1e-9);
  ck_assert_double_eq_tol (img->value_scale, (0.5 * 4095 - 0.5 * 819) / 65535.0, 1e-12);
  ck_assert_int_eq (img->pixels[0], 0);
  ck_assert_int_eq (img->pixels[10 * img->width + 10], 65535);
  hl_gray_image_free (img);
}
END_TEST

START_TEST (test_window_presets)
{
  HlGrayImage *img = load_ok (make_dicom ("w.dcm", NULL, "--bits 12 --window 2000,1000"));
  double c, w;
  bool from_file;
  hl_gray_image_default_window (img, &c, &w, &from_file);
  ck_assert (from_file);
  ck_assert_double_eq_tol (c, 2000, 1e-9);
  ck_assert_double_eq_tol (w, 1000, 1e-9);
  hl_gray_image_free (img);
  /* MONOCHROME1: the preset turned over with the pixels. */
  img = load_ok (make_dicom ("w.dcm", NULL,
                             "--bits 12 --photometric MONOCHROME1 --window 1000,500"));
  hl_gray_image_default_window (img, &c, &w, &from_file);
  ck_assert_double_eq_tol (c, 4095 - 1000, 1e-9);
  ck_assert_double_eq_tol (w, 500, 1e-9);
  hl_gray_image_free (img);
}
END_TEST

START_TEST (test_auto_window)
{
  /* The ramp: 16 bits, values 13107 .. 39321 evenly over 80 columns; the
   * 0.5 and 99.5 percentiles lie at the ends. */
  HlGrayImage *img = load_ok (make_dicom ("a.dcm", NULL, "--bits 16 --rows 50 --cols 200"));
  double c, w;
  bool from_file;
  hl_gray_image_default_window (img, &c, &w, &from_file);
  ck_assert (!from_file);
  ck_assert_double_eq_tol (c - w / 2, 13107, 200);
  ck_assert_double_eq_tol (c + w / 2, 39321, 200);
  hl_gray_image_free (img);
}
END_TEST

START_TEST (test_frames_colour_burned)
{
  HlGrayImage *img = load_ok (make_dicom ("f.dcm", NULL, "--bits 8 --frames 3"));
  ck_assert_int_eq (img->frames, 3);
  ck_assert_msg (strstr (img->note, "first of 3 frames") != NULL, "%s", img->note);
  ck_assert_int_eq (img->pixels[0], 51);    /* the first frame: 0.2 * 255 */
  ck_assert (!img->burned_in_annotation);
  hl_gray_image_free (img);

  img = load_ok (make_dicom ("c.dcm", NULL, "--bits 8 --samples 3 --photometric RGB "
                                            "--burned-in YES"));
  ck_assert (img->colour_converted);
  ck_assert_msg (strstr (img->note, "converted to grey") != NULL, "%s", img->note);
  ck_assert_int_eq (img->pixels[0], 51);
  ck_assert (img->burned_in_annotation);
  hl_gray_image_free (img);

  img = load_ok (make_dicom ("c.dcm", "rle", "--bits 8 --samples 3 --photometric RGB"));
  ck_assert_int_eq (img->pixels[0], 51);
  hl_gray_image_free (img);
}
END_TEST

START_TEST (test_nothing_identifying)
{
  HlGrayImage *img = load_ok (make_dicom ("id.dcm", NULL,
                                          "--pixel-spacing '0.1\\0.1' --burned-in YES"));
  /* The struct without its pixel pointer holds only technical values. */
  const char *words[] = { "TEST", "INVENTED", "ID-000", "19000101", "ACC-", "REFERRER" };
  for (size_t i = 0; i < N_OF (words); i++)
    ck_assert (memmem (img, sizeof *img, words[i], strlen (words[i])) == NULL);
  hl_gray_image_free (img);
}
END_TEST

/* ---- Bad input ---------------------------------------------------------- */

typedef struct {
  const char *args;       /* make-dicom.py, or NULL for raw bytes below */
  const char *raw;        /* file content when args is NULL */
  const char *mentions;   /* a word the message must contain */
} BadCase;

static const BadCase bad_cases[] = {
  { NULL, "just some text, not an image at all ...", "not a DICOM, PNG, TIFF or JPEG" },
  { NULL, "", "not a DICOM, PNG, TIFF or JPEG" },
  { "--truncate 3000", NULL, "truncated" },
  { "--transfer-syntax 1.2.3.4.5.6.7", NULL, "transfer syntax" },
  { "--rows 0", NULL, "has no pixels" },
  { "--rows 65535 --cols 65535 --no-pixels", NULL, "megapixels" },
  { "--rows 12000 --cols 9000 --no-pixels", NULL, "megapixels" },
  { "--pixel-spacing '0\\0' --calibration-type GEOMETRY", NULL, "Pixel Spacing" },
  { "--pixel-spacing='-0.1\\-0.1'", NULL, "Pixel Spacing" },
  { "--pixel-spacing 'NaN\\NaN'", NULL, "Pixel Spacing" },
  { "--imager-spacing 'inf\\inf'", NULL, "Imager Pixel Spacing" },
  { "--imager-spacing 'abc'", NULL, "Imager Pixel Spacing" },
  { "--imager-spacing '0.1\\0.2'", NULL, "square" },
  { "--imager-spacing '0.15\\0.15' --ermf 0.9", NULL, "0.9" },
  { "--imager-spacing '0.15\\0.15' --ermf 1.7", NULL, "1.7" },
  { "--bits-allocated 32 --bits 16", NULL, "32 bits" },
};

START_TEST (test_bad)
{
  const BadCase *c = &bad_cases[_i];
  const char *path;
  if (c->args != NULL)
    path = make_dicom ("bad.dcm", NULL, c->args);
  else
    {
      path = tmp_path ("bad.dcm");
      FILE *f = fopen (path, "wb");
      ck_assert (f != NULL);
      fputs (c->raw, f);
      fclose (f);
    }
  HlError err = { 0 };
  HlGrayImage *img = hl_gray_image_load (path, &err);
  ck_assert_msg (img == NULL, "%s: loaded", c->args ? c->args : c->raw);
  ck_assert_msg (strstr (err.message, c->mentions) != NULL, "%s: \"%s\" lacks \"%s\"",
                 c->args ? c->args : "raw", err.message, c->mentions);
  ck_assert_msg (strstr (err.message, "bad.dcm") != NULL, "%s", err.message);
}
END_TEST

START_TEST (test_missing_and_huge)
{
  HlError err = { 0 };
  ck_assert (hl_gray_image_load (tmp_path ("absent.dcm"), &err) == NULL);
  ck_assert (strstr (err.message, "moved or deleted") != NULL);
  /* A sparse file over 512 MB is refused before it is read. */
  const char *big = tmp_path ("big.dcm");
  FILE *f = fopen (big, "wb");
  ck_assert (f != NULL);
  ck_assert (ftruncate (fileno (f), HL_GRAY_IMAGE_MAX_FILE_BYTES + 1) == 0);
  fclose (f);
  ck_assert (hl_gray_image_load (big, &err) == NULL);
  ck_assert_msg (strstr (err.message, "over 512 MB") != NULL, "%s", err.message);
  unlink (big);
}
END_TEST

#if HL_TEST_HOOKS
static double
mono_seconds (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* The reading child sleeps 30 s (test hook); with a limit of 1 s the
 * file is refused within a few seconds, saying so, and no child is left
 * behind.  Without the hook the same file loads. */
START_TEST (test_child_timeout)
{
  const char *path = make_dicom ("slow.dcm", NULL, "--bits 12");
  setenv ("HIPLEVER_TEST_DICOM_CHILD_SLEEP", "30", 1);
  setenv ("HIPLEVER_DICOM_TIMEOUT", "1", 1);
  HlError err = { 0 };
  double t0 = mono_seconds ();
  HlGrayImage *img = hl_gray_image_load (path, &err);
  double took = mono_seconds () - t0;
  ck_assert_msg (img == NULL, "a hanging reader gave an image");
  ck_assert_msg (took >= 0.9 && took < 10.0, "refused after %.2f s", took);
  ck_assert_msg (strstr (err.message, "took longer than 1 s") != NULL, "%s", err.message);
  ck_assert_msg (strstr (err.message, "slow.dcm") != NULL, "%s", err.message);
  errno = 0;
  ck_assert_msg (waitpid (-1, NULL, WNOHANG) == -1 && errno == ECHILD,
                 "the stopped reader was not reaped");

  /* A reader that takes 1 s, within a limit of 20 s, gives the image. */
  setenv ("HIPLEVER_TEST_DICOM_CHILD_SLEEP", "1", 1);
  setenv ("HIPLEVER_DICOM_TIMEOUT", "20", 1);
  img = load_ok (path);
  ck_assert_int_eq (img->bits, 12);
  hl_gray_image_free (img);

  /* A limit that is not a positive number is the default (60 s). */
  setenv ("HIPLEVER_DICOM_TIMEOUT", "-3", 1);
  img = load_ok (path);
  hl_gray_image_free (img);
  unsetenv ("HIPLEVER_TEST_DICOM_CHILD_SLEEP");
  unsetenv ("HIPLEVER_DICOM_TIMEOUT");
}
END_TEST
#endif

/* ---- PNG and TIFF at 16 bits -------------------------------------------- */

#define IMG_W 40
#define IMG_H 30
static uint16_t
sample_value (int x, int y)
{
  return (uint16_t) (x == 5 && y == 7 ? 32000 : 1000 + 1500 * x + 7 * y);
}

static void
write_png16 (const char *path)
{
  FILE *f = fopen (path, "wb");
  ck_assert (f != NULL);
  png_structp png = png_create_write_struct (PNG_LIBPNG_VER_STRING, NULL, NULL, NULL);
  png_infop info = png_create_info_struct (png);
  png_init_io (png, f);
  png_set_IHDR (png, info, IMG_W, IMG_H, 16, PNG_COLOR_TYPE_GRAY, PNG_INTERLACE_NONE,
                PNG_COMPRESSION_TYPE_DEFAULT, PNG_FILTER_TYPE_DEFAULT);
  png_write_info (png, info);
  png_byte row[IMG_W * 2];
  for (int y = 0; y < IMG_H; y++)
    {
      for (int x = 0; x < IMG_W; x++)
        {
          row[2 * x] = sample_value (x, y) >> 8;
          row[2 * x + 1] = sample_value (x, y) & 0xff;
        }
      png_write_row (png, row);
    }
  png_write_end (png, NULL);
  png_destroy_write_struct (&png, &info);
  fclose (f);
}

static void
write_tiff16 (const char *path)
{
  TIFF *t = TIFFOpen (path, "w");
  ck_assert (t != NULL);
  TIFFSetField (t, TIFFTAG_IMAGEWIDTH, IMG_W);
  TIFFSetField (t, TIFFTAG_IMAGELENGTH, IMG_H);
  TIFFSetField (t, TIFFTAG_BITSPERSAMPLE, 16);
  TIFFSetField (t, TIFFTAG_SAMPLESPERPIXEL, 1);
  TIFFSetField (t, TIFFTAG_PHOTOMETRIC, PHOTOMETRIC_MINISBLACK);
  TIFFSetField (t, TIFFTAG_PLANARCONFIG, PLANARCONFIG_CONTIG);
  TIFFSetField (t, TIFFTAG_COMPRESSION, COMPRESSION_ADOBE_DEFLATE);
  uint16_t row[IMG_W];
  for (int y = 0; y < IMG_H; y++)
    {
      for (int x = 0; x < IMG_W; x++)
        row[x] = sample_value (x, y);
      ck_assert (TIFFWriteScanline (t, row, y, 0) == 1);
    }
  TIFFClose (t);
}

START_TEST (test_png_tiff_16)
{
  const char *png = tmp_path ("sixteen.png"), *tif = tmp_path ("sixteen.tif");
  write_png16 (png);
  write_tiff16 (tif);
  const char *paths[] = { png, tif };
  const HlImageFormat formats[] = { HL_IMAGE_FORMAT_PNG, HL_IMAGE_FORMAT_TIFF };
  for (int k = 0; k < 2; k++)
    {
      HlGrayImage *img = load_ok (paths[k]);
      ck_assert (img->format == formats[k]);
      ck_assert_int_eq (img->bits, 16);
      ck_assert_int_eq (img->width, IMG_W);
      ck_assert_int_eq (img->height, IMG_H);
      for (int y = 0; y < IMG_H; y++)
        for (int x = 0; x < IMG_W; x++)
          ck_assert_int_eq (img->pixels[y * IMG_W + x], sample_value (x, y));
      ck_assert_int_eq (img->pixels[7 * IMG_W + 5], 32000);
      HlSpacingChoice sc;
      ck_assert (hl_spacing_choose (&img->spacing, &sc, NULL) == HL_OK);
      ck_assert (sc.source == HL_SPACING_NONE);
      hl_gray_image_free (img);
    }
}
END_TEST

static Suite *
image_suite (void)
{
  Suite *s = suite_create ("image");
  TCase *tc = tcase_create ("choose");
  tcase_add_loop_test (tc, test_choose, 0, N_OF (choose_cases));
  tcase_add_loop_test (tc, test_choose_bad, 0, N_OF (choose_bad));
  suite_add_tcase (s, tc);
  tc = tcase_create ("files");
  tcase_set_timeout (tc, 120);
  tcase_add_test (tc, test_png_tiff_16);
  tcase_add_test (tc, test_missing_and_huge);
  if (hl_dicom_available ())
    {
      tcase_add_loop_test (tc, test_file_calibration, 0, N_OF (file_cases));
      tcase_add_loop_test (tc, test_encodings, 0,
                           N_OF (codecs) * N_OF (photometrics) * N_OF (bit_depths));
      tcase_add_test (tc, test_rescale_identity);
      tcase_add_test (tc, test_rescale_mapped);
      tcase_add_test (tc, test_window_presets);
      tcase_add_test (tc, test_auto_window);
      tcase_add_test (tc, test_frames_colour_burned);
      tcase_add_test (tc, test_nothing_identifying);
      tcase_add_loop_test (tc, test_bad, 0, N_OF (bad_cases));
#if HL_TEST_HOOKS
      tcase_add_test (tc, test_child_timeout);
#endif
    }
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  const char *base = getenv ("TMPDIR") ? getenv ("TMPDIR") : "/tmp";
  snprintf (tmpdir, sizeof tmpdir, "%s/hl-test-image-XXXXXX", base);
  if (mkdtemp (tmpdir) == NULL)
    return 1;
  SRunner *sr = srunner_create (image_suite ());
  srunner_set_fork_status (sr, CK_NOFORK);
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  char cmd[CMD_MAX];
  snprintf (cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
  if (system (cmd) != 0)
    fprintf (stderr, "could not remove %s\n", tmpdir);
  return failed == 0 ? 0 : 1;
}
