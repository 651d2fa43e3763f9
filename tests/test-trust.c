/* test-trust.c: saving never harms what is at the output path, bounded
 * work, outputs that read back and text that cannot mislead.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every test works in its own temporary folder: the pipes, links and
 * files it writes over are its own (no system file is ever a target).
 */
#include "config.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hl-buf.h"
#include "hl-plan-io.h"
#include "hl-test-util.h"

#define HL_PATH_MAX 4096
#define N_OF(a) (sizeof (a) / sizeof (a)[0])

static char *
make_temp_dir (void)
{
  char *dir = strdup ("/tmp/hl-test-trust-XXXXXX");
  ck_assert_ptr_nonnull (dir);
  ck_assert_msg (mkdtemp (dir) != NULL, "mkdtemp: %s", strerror (errno));
  return dir;
}

static void
remove_tree (char *dir)
{
  char cmd[HL_PATH_MAX + 32];
  snprintf (cmd, sizeof cmd, "rm -rf '%s'", dir);
  ck_assert_int_eq (system (cmd), 0);
  free (dir);
}

/* Number of entries in dir other than . and .. */
static int
count_entries (const char *dir)
{
  DIR *d = opendir (dir);
  ck_assert_ptr_nonnull (d);
  int n = 0;
  for (struct dirent *e; (e = readdir (d)) != NULL;)
    if (strcmp (e->d_name, ".") != 0 && strcmp (e->d_name, "..") != 0)
      n++;
  closedir (d);
  return n;
}

static void
write_text (const char *path, const char *text)
{
  FILE *f = fopen (path, "wb");
  ck_assert_ptr_nonnull (f);
  ck_assert_uint_eq (fwrite (text, 1, strlen (text), f), strlen (text));
  ck_assert_int_eq (fclose (f), 0);
}

static char *
read_text (const char *path)
{
  FILE *f = fopen (path, "rb");
  ck_assert_ptr_nonnull (f);
  static char buf[4096];
  size_t n = fread (buf, 1, sizeof buf - 1, f);
  buf[n] = '\0';
  fclose (f);
  return buf;
}

/* ---- Saving never harms what is at the output path --------------------- */

START_TEST (test_fifo_refused)
{
  char *dir = make_temp_dir ();
  char fifo[HL_PATH_MAX], link_path[HL_PATH_MAX];
  snprintf (fifo, sizeof fifo, "%s/pipe", dir);
  snprintf (link_path, sizeof link_path, "%s/link-to-pipe", dir);
  ck_assert_int_eq (mkfifo (fifo, 0600), 0);
  ck_assert_int_eq (symlink (fifo, link_path), 0);

  const char *targets[] = { fifo, link_path };
  for (size_t i = 0; i < N_OF (targets); i++)
    {
      HlError err;
      hl_error_clear (&err);
      ck_assert_int_eq (hl_output_path_check (targets[i], &err), HL_ERR_IO);
      hl_error_clear (&err);
      ck_assert_int_eq (hl_write_file_atomic (targets[i], "x\n", 2, &err), HL_ERR_IO);
      ck_assert_msg (strstr (err.message, "named pipe") != NULL, "%s", err.message);
      ck_assert_msg (strstr (err.message, targets[i]) != NULL, "%s", err.message);
      hl_error_clear (&err);
      ck_assert_int_eq (hl_write_file_atomic_backup (targets[i], "x\n", 2, &err), HL_ERR_IO);
    }
  struct stat st;
  ck_assert_int_eq (lstat (fifo, &st), 0);
  ck_assert (S_ISFIFO (st.st_mode));
  ck_assert_int_eq (lstat (link_path, &st), 0);
  ck_assert (S_ISLNK (st.st_mode));
  /* Nothing else (no temporary file, no backup) was left. */
  ck_assert_int_eq (count_entries (dir), 2);
  remove_tree (dir);
}
END_TEST

START_TEST (test_folder_and_dangling_link_refused)
{
  char *dir = make_temp_dir ();
  char sub[HL_PATH_MAX], dangling[HL_PATH_MAX];
  snprintf (sub, sizeof sub, "%s/folder", dir);
  snprintf (dangling, sizeof dangling, "%s/dangling", dir);
  ck_assert_int_eq (mkdir (sub, 0700), 0);
  ck_assert_int_eq (symlink ("nowhere/at/all", dangling), 0);
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_write_file_atomic (sub, "x", 1, &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, "folder") != NULL, "%s", err.message);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_write_file_atomic (dangling, "x", 1, &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, "link") != NULL, "%s", err.message);
  struct stat st;
  ck_assert_int_eq (lstat (dangling, &st), 0);
  ck_assert (S_ISLNK (st.st_mode));
  ck_assert_int_eq (count_entries (dir), 2);
  remove_tree (dir);
}
END_TEST

/* A character device is refused by its type; the test never writes near
 * a real device: it only asks whether /dev/null may be written. */
START_TEST (test_device_refused_by_check)
{
  struct stat st;
  if (stat ("/dev/null", &st) != 0 || !S_ISCHR (st.st_mode))
    return;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_output_path_check ("/dev/null", &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, "character device") != NULL, "%s", err.message);
}
END_TEST

START_TEST (test_link_to_file_writes_target)
{
  char *dir = make_temp_dir ();
  char file[HL_PATH_MAX], link_path[HL_PATH_MAX];
  snprintf (file, sizeof file, "%s/real.txt", dir);
  snprintf (link_path, sizeof link_path, "%s/alias.txt", dir);
  write_text (file, "old\n");
  ck_assert_int_eq (symlink ("real.txt", link_path), 0);
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_write_file_atomic (link_path, "new\n", 4, &err), HL_OK);
  struct stat st;
  ck_assert_int_eq (lstat (link_path, &st), 0);
  ck_assert_msg (S_ISLNK (st.st_mode), "the link was replaced");
  ck_assert_str_eq (read_text (file), "new\n");
  ck_assert_int_eq (count_entries (dir), 2);
  remove_tree (dir);
}
END_TEST

START_TEST (test_mode_kept)
{
  static const mode_t modes[] = { 0600, 0640, 0604, 0755 };
  char *dir = make_temp_dir ();
  char file[HL_PATH_MAX];
  snprintf (file, sizeof file, "%s/kept.xml", dir);
  for (size_t i = 0; i < N_OF (modes); i++)
    {
      write_text (file, "old\n");
      ck_assert_int_eq (chmod (file, modes[i]), 0);
      HlError err;
      hl_error_clear (&err);
      ck_assert_int_eq (hl_write_file_atomic (file, "new\n", 4, &err), HL_OK);
      struct stat st;
      ck_assert_int_eq (stat (file, &st), 0);
      ck_assert_msg ((st.st_mode & 07777) == modes[i], "mode %04o became %04o",
                     (unsigned) modes[i], (unsigned) (st.st_mode & 07777));
      ck_assert_uint_eq (st.st_uid, geteuid ());
      ck_assert_str_eq (read_text (file), "new\n");
      ck_assert_int_eq (unlink (file), 0);
    }
  remove_tree (dir);
}
END_TEST

/* Names of 248 to NAME_MAX bytes: the temporary name must not be longer
 * than the name itself allows. */
START_TEST (test_long_names)
{
  char *dir = make_temp_dir ();
  long name_max = pathconf (dir, _PC_NAME_MAX);
  if (name_max <= 0 || name_max > 1024)
    name_max = 255;
  for (long len = 248; len <= name_max; len++)
    {
      char path[HL_PATH_MAX];
      int at = snprintf (path, sizeof path, "%s/", dir);
      memset (path + at, 'n', (size_t) len);
      path[at + len] = '\0';
      memcpy (path + at + len - 4, ".xml", 4);
      HlError err;
      hl_error_clear (&err);
      ck_assert_msg (hl_write_file_atomic (path, "one\n", 4, &err) == HL_OK,
                     "a name of %ld bytes: %s", len, err.message);
      /* Replacing works too. */
      ck_assert_msg (hl_write_file_atomic (path, "two\n", 4, &err) == HL_OK,
                     "a name of %ld bytes, replaced: %s", len, err.message);
      ck_assert_str_eq (read_text (path), "two\n");
      ck_assert_int_eq (unlink (path), 0);
    }
  ck_assert_int_eq (count_entries (dir), 0);
  remove_tree (dir);
}
END_TEST

START_TEST (test_same_file)
{
  char *dir = make_temp_dir ();
  char a[HL_PATH_MAX], b[HL_PATH_MAX], l[HL_PATH_MAX], h[HL_PATH_MAX];
  snprintf (a, sizeof a, "%s/a", dir);
  snprintf (b, sizeof b, "%s/b", dir);
  snprintf (l, sizeof l, "%s/l", dir);
  snprintf (h, sizeof h, "%s/./a", dir);
  write_text (a, "a");
  write_text (b, "b");
  ck_assert_int_eq (symlink ("a", l), 0);
  ck_assert (hl_file_same (a, a));
  ck_assert (hl_file_same (a, l));
  ck_assert (hl_file_same (a, h));
  ck_assert (!hl_file_same (a, b));
  ck_assert (!hl_file_same (a, "/nonexistent/x"));
  remove_tree (dir);
}
END_TEST

/* ---- Text that cannot mislead ------------------------------------------ */

START_TEST (test_csv_formula_cells)
{
  static const struct { const char *in, *out; } cases[] = {
    { "=1+2", "'=1+2" }, { "+A1", "'+A1" }, { "-3 mm cup", "'-3 mm cup" },
    { "@SUM(A1)", "'@SUM(A1)" }, { "\tx", "'\tx" }, { "\rx", "\"'\rx\"" },
    { "=a,b", "\"'=a,b\"" }, { "plain", "plain" }, { "a=b", "a=b" },
    { "x \"y\"", "\"x \"\"y\"\"\"" }, { "", "" },
  };
  for (size_t i = 0; i < N_OF (cases); i++)
    {
      HlBuf b;
      hl_buf_init (&b);
      hl_buf_csv_field (&b, cases[i].in);
      hl_buf_append (&b, "", 0);
      ck_assert (!b.failed);
      ck_assert_str_eq (b.data != NULL ? b.data : "", cases[i].out);
      hl_buf_clear (&b);
    }
}
END_TEST

static Suite *
trust_suite (void)
{
  Suite *s = suite_create ("trust");
  TCase *tc = tcase_create ("output-path");
  tcase_add_test (tc, test_fifo_refused);
  tcase_add_test (tc, test_folder_and_dangling_link_refused);
  tcase_add_test (tc, test_device_refused_by_check);
  tcase_add_test (tc, test_link_to_file_writes_target);
  tcase_add_test (tc, test_mode_kept);
  tcase_add_test (tc, test_long_names);
  tcase_add_test (tc, test_same_file);
  suite_add_tcase (s, tc);
  tc = tcase_create ("text");
  tcase_add_test (tc, test_csv_formula_cells);
  suite_add_tcase (s, tc);
  return s;
}

int
main (void)
{
  hl_test_fix_environment ();
  SRunner *sr = srunner_create (trust_suite ());
  srunner_run_all (sr, CK_NORMAL);
  int failed = srunner_ntests_failed (sr);
  srunner_free (sr);
  return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
