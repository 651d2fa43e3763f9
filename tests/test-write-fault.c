/* test-write-fault.c: every output, written onto a full disk, leaves the
 * old file as it was.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Run under LD_PRELOAD=libhl-fault-write.so (tests/hl-fault-write.c): the
 * writes into the test's folder stop after a set number of bytes with
 * ENOSPC.  For each output (plan, planning summary, PDF report, SVG and
 * PNG figure at a chosen size and at a preset's (every figure file goes
 * through hl_figure_save_preset; the render layer writes no file), a CSV table written at once and one streamed as batch does,
 * and the two GLib calls the window's settings and autosave use,
 * g_file_set_contents and g_key_file_save_to_file), written over an old
 * file after 0, 1, 100 bytes and all but the last byte: the write must
 * fail, the old file keep its bytes, and no temporary file stay behind.
 */
#include "config.h"

#include <dirent.h>
#include <dlfcn.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <check.h>
#include <glib.h>

#include "hl-plan-io.h"
#include "hl-report.h"

#ifndef HL_TEST_SRCDIR
# error "HL_TEST_SRCDIR must name the source tree"
#endif
#define HL_DEMO HL_TEST_SRCDIR "/data/examples/demo.hlplan"
#define OLD_TEXT "the old file, which must survive\n"

static HlPlan *demo;
static char dir[64];

typedef bool (*Writer) (const char *path, size_t *size, char *why, size_t why_size);

static bool
report_err (HlStatus st, const HlError *err, char *why, size_t n)
{
  snprintf (why, n, "%s", err->message);
  return st == HL_OK;
}

static bool
w_plan (const char *path, size_t *size, char *why, size_t n)
{
  HlError err;
  hl_error_clear (&err);
  *size = 1500;
  return report_err (hl_plan_save_file (demo, path, &err), &err, why, n);
}

static bool
w_plan_backup (const char *path, size_t *size, char *why, size_t n)
{
  HlError err;
  hl_error_clear (&err);
  *size = 1500;
  return report_err (hl_plan_save_file_backup (demo, path, &err), &err, why, n);
}

static bool
w_summary (const char *path, size_t *size, char *why, size_t n)
{
  HlError err;
  hl_error_clear (&err);
  *size = 4000;
  return report_err (hl_summary_save_file (demo, path, &err), &err, why, n);
}

static bool
w_report (const char *path, size_t *size, char *why, size_t n)
{
  HlReportSettings settings;
  HlError err;
  hl_report_settings_init (&settings);
  hl_error_clear (&err);
  *size = 20000;
  return report_err (hl_report_save_pdf (demo, &settings, path, &err), &err, why, n);
}

static bool
w_figure (const char *path, size_t *size, char *why, size_t n)
{
  HlError err;
  hl_error_clear (&err);
  *size = 2000;
  return report_err (hl_figure_save (demo, 0, 320, 300, path, &err), &err, why, n);
}

/* The command line's figure: at a preset's size (half a slide, 960 x
 * 1080 px), through hl_figure_save_preset. */
static bool
w_figure_preset (const char *path, size_t *size, char *why, size_t n)
{
  HlError err;
  hl_error_clear (&err);
  *size = 2000;
  return report_err (hl_figure_save_preset (demo, 0, 320, 300, HL_RENDER_PRESET_HALF_SLIDE,
                                            NULL, path, &err), &err, why, n);
}

static const char csv_text[] =
  "option,value\nnative,1.000\nStandard stem,-3.000\nLateralised,2.500\n";

static bool
w_csv (const char *path, size_t *size, char *why, size_t n)
{
  HlError err;
  hl_error_clear (&err);
  *size = sizeof csv_text - 1;
  return report_err (hl_write_file_atomic (path, csv_text, sizeof csv_text - 1, &err), &err,
                     why, n);
}

/* As batch writes its table: row by row into one temporary file. */
static bool
w_csv_streamed (const char *path, size_t *size, char *why, size_t n)
{
  HlError err;
  HlOutFile *f = NULL;
  hl_error_clear (&err);
  *size = 20 * (sizeof csv_text - 1);
  HlStatus st = hl_out_file_open (path, false, &f, &err);
  for (int i = 0; st == HL_OK && i < 20; i++)
    st = hl_out_file_write (f, csv_text, sizeof csv_text - 1, &err);
  if (st == HL_OK)
    st = hl_out_file_commit (f, &err);
  else if (f != NULL)
    hl_out_file_abort (f);
  return report_err (st, &err, why, n);
}

static bool
w_settings (const char *path, size_t *size, char *why, size_t n)
{
  static const char text[] = "[window]\nwidth=1200\nheight=900\n";
  GError *error = NULL;
  *size = sizeof text - 1;
  bool ok = g_file_set_contents (path, text, (gssize) sizeof text - 1, &error);
  snprintf (why, n, "%s", error != NULL ? error->message : "");
  g_clear_error (&error);
  return ok;
}

static bool
w_autosave_meta (const char *path, size_t *size, char *why, size_t n)
{
  GKeyFile *kf = g_key_file_new ();
  GError *error = NULL;
  g_key_file_set_string (kf, "autosave", "plan", "/home/someone/case.hlplan");
  g_key_file_set_int64 (kf, "autosave", "saved", 1700000000);
  *size = 60;
  bool ok = g_key_file_save_to_file (kf, path, &error);
  snprintf (why, n, "%s", error != NULL ? error->message : "");
  g_clear_error (&error);
  g_key_file_free (kf);
  return ok;
}

static int
count_entries (const char *d)
{
  DIR *dp = opendir (d);
  ck_assert_ptr_nonnull (dp);
  int n = 0;
  for (struct dirent *e; (e = readdir (dp)) != NULL;)
    if (strcmp (e->d_name, ".") != 0 && strcmp (e->d_name, "..") != 0)
      n++;
  closedir (dp);
  return n;
}

static void
check_writer (const char *name, const char *file, Writer w)
{
  char path[256], why[HL_ERROR_MESSAGE_MAX], match[80];
  snprintf (path, sizeof path, "%s/%s", dir, file);
  snprintf (match, sizeof match, "%s/", dir);
  size_t size = 0;

  /* Unharmed first: it writes, and how much.  Twice, the smaller size
   * kept: a process's first figure can come out a few bytes longer than
   * the next ones (pango's font set-up), and a fault after all but the
   * last byte must fall inside every later write. */
  for (int k = 0; k < 2; k++)
    {
      ck_assert_msg (w (path, &size, why, sizeof why), "%s: %s", name, why);
      gchar *whole = NULL;
      gsize whole_size = 0;
      ck_assert (g_file_get_contents (path, &whole, &whole_size, NULL));
      g_free (whole);
      if (k == 0 || whole_size < size)
        size = whole_size;
    }

  const long afters[] = { 0, 1, 100, (long) size - 1 };
  for (size_t i = 0; i < sizeof afters / sizeof afters[0]; i++)
    {
      if (afters[i] < 0 || afters[i] >= (long) size || (i > 0 && afters[i] <= afters[i - 1]))
        continue;
      ck_assert (g_file_set_contents (path, OLD_TEXT, -1, NULL));
      char after[32];
      snprintf (after, sizeof after, "%ld", afters[i]);
      setenv ("HL_FAULT_WRITE_MATCH", match, 1);
      setenv ("HL_FAULT_WRITE_AFTER", after, 1);
      size_t ignored;
      bool ok = w (path, &ignored, why, sizeof why);
      unsetenv ("HL_FAULT_WRITE_AFTER");
      unsetenv ("HL_FAULT_WRITE_MATCH");
      ck_assert_msg (!ok, "%s: a write stopped after %ld of %zu bytes succeeded", name,
                     afters[i], size);
      ck_assert_msg (why[0] != '\0', "%s: failed without a message", name);
      gchar *now = NULL;
      ck_assert (g_file_get_contents (path, &now, NULL, NULL));
      ck_assert_msg (strcmp (now, OLD_TEXT) == 0, "%s: the old file changed after a "
                     "write stopped at %ld bytes", name, afters[i]);
      g_free (now);
      /* The file, and a plan's backup from the unharmed save. */
      int n = count_entries (dir);
      ck_assert_msg (n == 1 || (n == 2 && w == w_plan_backup), "%s: %d files left after "
                     "a failed write", name, n);
    }
  unlink (path);
  char backup[300];
  snprintf (backup, sizeof backup, "%s" HL_PLAN_BACKUP_SUFFIX, path);
  unlink (backup);
}

#define WRITE_TEST(fn, file)                    \
  START_TEST (test_##fn)                        \
  {                                             \
    check_writer (#fn, file, w_##fn);           \
  }                                             \
  END_TEST

WRITE_TEST (plan, "case.hlplan")
WRITE_TEST (plan_backup, "case.hlplan")
WRITE_TEST (summary, "summary.xml")
WRITE_TEST (report, "report.pdf")
WRITE_TEST (csv, "table.csv")
WRITE_TEST (csv_streamed, "batch.csv")
WRITE_TEST (settings, "settings.ini")
WRITE_TEST (autosave_meta, "autosave.ini")

START_TEST (test_figures)
{
  check_writer ("figure svg", "figure.svg", w_figure);
  check_writer ("figure png", "figure.png", w_figure);
  check_writer ("figure svg, half slide", "slide.svg", w_figure_preset);
  check_writer ("figure png, half slide", "slide.png", w_figure_preset);
}
END_TEST

static void
setup (void)
{
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_load_file (HL_DEMO, &demo, &err), HL_OK);
  demo->uncertainty.n_samples = 50;
  snprintf (dir, sizeof dir, "/tmp/hl-test-write-fault-XXXXXX");
  ck_assert_ptr_nonnull (mkdtemp (dir));
}

static void
teardown (void)
{
  rmdir (dir);
  hl_plan_free (demo);
}

int
main (void)
{
  if (dlsym (RTLD_DEFAULT, "hl_fault_write_active") == NULL)
    {
      fprintf (stderr, "test-write-fault: run it with LD_PRELOAD=libhl-fault-write.so\n");
      return 77;
    }
  Suite *s = suite_create ("write-fault");
  TCase *tc = tcase_create ("every output");
  tcase_add_checked_fixture (tc, setup, teardown);
  tcase_set_timeout (tc, 300);
  tcase_add_test (tc, test_plan);
  tcase_add_test (tc, test_plan_backup);
  tcase_add_test (tc, test_summary);
  tcase_add_test (tc, test_report);
  tcase_add_test (tc, test_figures);
  tcase_add_test (tc, test_csv);
  tcase_add_test (tc, test_csv_streamed);
  tcase_add_test (tc, test_settings);
  tcase_add_test (tc, test_autosave_meta);
  suite_add_tcase (s, tc);
  SRunner *sr = srunner_create (s);
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
