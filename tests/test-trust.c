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
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include <glib.h>

#include "hl-catalogue.h"
#include "hl-deadline.h"
#include "hl-file-write.h"
#include "hl-fit.h"
#include "hl-image.h"
#include "hl-sweep.h"
#include "hl-template.h"
#include "hl-text.h"
#include "hl-uncertainty.h"
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
  /* Set-ID and sticky bits are not carried over to what we write
   * (common practice: a set-ID bit must not survive new contents). */
  static const mode_t special[][2] = { { 04755, 0755 }, { 02750, 0750 }, { 01644, 0644 },
                                       { 06700, 0700 } };
  for (size_t i = 0; i < N_OF (special); i++)
    {
      write_text (file, "old\n");
      ck_assert_int_eq (chmod (file, special[i][0]), 0);
      HlError err;
      hl_error_clear (&err);
      ck_assert_int_eq (hl_write_file_atomic (file, "new\n", 4, &err), HL_OK);
      struct stat st;
      ck_assert_int_eq (stat (file, &st), 0);
      ck_assert_msg ((st.st_mode & 07777) == special[i][1], "mode %04o became %04o, not %04o",
                     (unsigned) special[i][0], (unsigned) (st.st_mode & 07777),
                     (unsigned) special[i][1]);
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

/* ---- Plans: bounded, every field checked, unique names ------------------ */

#define HL_EXAMPLE HL_TEST_SRCDIR "/data/examples/demo.hlplan"

static char *
slurp (const char *path, size_t *size)
{
  FILE *f = fopen (path, "rb");
  ck_assert_ptr_nonnull (f);
  ck_assert_int_eq (fseek (f, 0, SEEK_END), 0);
  long n = ftell (f);
  ck_assert_int_ge (n, 0);
  rewind (f);
  char *data = malloc ((size_t) n + 1);
  ck_assert_ptr_nonnull (data);
  ck_assert_uint_eq (fread (data, 1, (size_t) n, f), (size_t) n);
  data[n] = '\0';
  fclose (f);
  *size = (size_t) n;
  return data;
}

/* The demo plan's text with its <options> element replaced by `options`
 * and the case label by `label` (NULL keeps it). */
static char *
demo_with (const char *options, const char *label)
{
  size_t size;
  char *demo = slurp (HL_EXAMPLE, &size);
  char *start = strstr (demo, "<options>");
  char *end = strstr (demo, "</options>");
  ck_assert (start != NULL && end != NULL);
  end += strlen ("</options>");
  size_t n = size + strlen (options) + 256;
  char *out = malloc (n);
  ck_assert_ptr_nonnull (out);
  snprintf (out, n, "%.*s%s%s", (int) (start - demo), demo, options, end);
  if (label != NULL)
    {
      char *l = strstr (out, "label=\"");
      ck_assert_ptr_nonnull (l);
      l += strlen ("label=\"");
      char *q = strchr (l, '"');
      size_t m = strlen (out) + strlen (label) + 1;
      char *out2 = malloc (m);
      ck_assert_ptr_nonnull (out2);
      snprintf (out2, m, "%.*s%s%s", (int) (l - out), out, label, q);
      free (out);
      out = out2;
    }
  free (demo);
  return out;
}

/* n options named "Option 1" ... */
static char *
options_xml (int n)
{
  size_t cap = 64 + (size_t) n * 64;
  char *x = malloc (cap);
  ck_assert_ptr_nonnull (x);
  size_t len = (size_t) snprintf (x, cap, "<options>\n");
  for (int i = 0; i < n; i++)
    len += (size_t) snprintf (x + len, cap - len,
                              "    <option name=\"Option %d\" femoral-offset-mm=\"%d\"/>\n",
                              i + 1, i % 10);
  snprintf (x + len, cap - len, "  </options>");
  return x;
}

static HlStatus
load_text (const char *text, HlPlan **plan, HlError *err)
{
  *plan = NULL;
  hl_error_clear (err);
  return hl_plan_load_buffer (text, strlen (text), "test.hlplan", plan, err);
}

/* A plan saved with backup under names of 248 to NAME_MAX bytes: the
 * previous version is kept, as NAME~ while that fits, else under the
 * shortened name hl_backup_path() gives (at most NAME_MAX bytes, cut at
 * a character boundary, different for names that differ only at the end). */
START_TEST (test_long_names_backup)
{
  size_t size;
  char *demo = slurp (HL_EXAMPLE, &size);
  HlPlan *plan = NULL;
  HlError err;
  ck_assert_int_eq (load_text (demo, &plan, &err), HL_OK);
  free (demo);
  char *dir = make_temp_dir ();
  long name_max = pathconf (dir, _PC_NAME_MAX);
  if (name_max <= 0 || name_max > 1024)
    name_max = 255;
  int n_shortened = 0;
  for (long len = 248; len <= name_max; len++)
    {
      char path[HL_PATH_MAX];
      int at = snprintf (path, sizeof path, "%s/", dir);
      /* "é" (2 bytes) repeated, then ".hlplan": the cut must not split one */
      long body = len - 7;
      for (long i = 0; i + 2 <= body; i += 2)
        memcpy (path + at + i, "\xc3\xa9", 2);
      if (body % 2 != 0)
        path[at + body - 1] = 'n';
      memcpy (path + at + body, ".hlplan", 8);
      ck_assert_uint_eq (strlen (path + at), (size_t) len);
      for (int k = 1; k <= 3; k++)
        {
          plan->mass_kg = 60.0 + k;
          hl_error_clear (&err);
          ck_assert_msg (hl_plan_save_file_backup (plan, path, &err) == HL_OK,
                         "a name of %ld bytes, save %d: %s", len, k, err.message);
        }
      char *backup = hl_backup_path (path);
      ck_assert_ptr_nonnull (backup);
      const char *base = strrchr (backup, '/') + 1;
      ck_assert_uint_le (strlen (base), (size_t) name_max);
      ck_assert (g_utf8_validate (base, -1, NULL));
      if (len + 1 <= name_max)
        {
          char plain[HL_PATH_MAX + 2];
          snprintf (plain, sizeof plain, "%s~", path);
          ck_assert_str_eq (backup, plain);
        }
      else
        {
          n_shortened++;
          ck_assert_str_ne (base, path + at);
          ck_assert (g_str_has_suffix (backup, "~"));
          /* a name that differs only in its last letters has another backup */
          char other[HL_PATH_MAX];
          snprintf (other, sizeof other, "%s", path);
          other[strlen (other) - 1] = 'm';
          char *other_backup = hl_backup_path (other);
          ck_assert_str_ne (other_backup, backup);
          free (other_backup);
        }
      /* the file is the last save, the backup the one before */
      HlPlan *now = NULL, *before = NULL;
      ck_assert_int_eq (hl_plan_load_file (path, &now, &err), HL_OK);
      ck_assert_msg (hl_plan_load_file (backup, &before, &err) == HL_OK, "%s", err.message);
      ck_assert_double_eq (now->mass_kg, 63.0);
      ck_assert_double_eq (before->mass_kg, 62.0);
      hl_plan_free (now);
      hl_plan_free (before);
      ck_assert_int_eq (unlink (path), 0);
      ck_assert_int_eq (unlink (backup), 0);
      free (backup);
    }
  ck_assert_int_eq (count_entries (dir), 0);
  ck_assert_int_ge (n_shortened, 1);
  remove_tree (dir);
  hl_plan_free (plan);
}
END_TEST

START_TEST (test_option_limit_on_load)
{
  for (int n = HL_PLAN_MAX_OPTIONS; n <= HL_PLAN_MAX_OPTIONS + 1; n++)
    {
      char *opts = options_xml (n);
      char *text = demo_with (opts, NULL);
      HlPlan *plan;
      HlError err;
      HlStatus st = load_text (text, &plan, &err);
      if (n == HL_PLAN_MAX_OPTIONS)
        {
          ck_assert_msg (st == HL_OK, "64 options: %s", err.message);
          ck_assert_uint_eq (plan->n_options, (size_t) HL_PLAN_MAX_OPTIONS);
          /* The window's Add and Duplicate refuse the 65th. */
          ck_assert_int_eq (hl_plan_add_option (plan, "one more", NULL), -1);
          ck_assert_int_eq (hl_plan_duplicate_option (plan, 0), -1);
          ck_assert_uint_eq (plan->n_options, (size_t) HL_PLAN_MAX_OPTIONS);
          hl_plan_free (plan);
        }
      else
        {
          ck_assert_int_ne (st, HL_OK);
          ck_assert_ptr_null (plan);
          ck_assert_msg (strstr (err.message, "at most 64 options") != NULL, "%s",
                         err.message);
          ck_assert_msg (strstr (err.message, "option 65") != NULL, "%s", err.message);
          ck_assert_int_gt (err.line, 0);
        }
      free (opts);
      free (text);
    }
}
END_TEST

START_TEST (test_duplicate_names)
{
  char *text = demo_with ("<options>\n"
                          "    <option name=\"Same\" femoral-offset-mm=\"2\"/>\n"
                          "    <option name=\"Other\"/>\n"
                          "    <option name=\"Same\" femoral-offset-mm=\"4\"/>\n"
                          "  </options>", NULL);
  HlPlan *plan;
  HlError err;
  ck_assert_int_ne (load_text (text, &plan, &err), HL_OK);
  /* The two lines: the options start on the line after <options>. */
  const char *at = strstr (text, "<options>");
  int line = 1;
  for (const char *p = text; p < at; p++)
    line += *p == '\n';
  char want[64];
  snprintf (want, sizeof want, "on line %d and on line %d", line + 1, line + 3);
  ck_assert_msg (strstr (err.message, want) != NULL, "%s (want %s)", err.message, want);
  ck_assert_msg (strstr (err.message, "\"Same\"") != NULL, "%s", err.message);
  free (text);

  /* Built in memory: refused by the check, both named. */
  HlPlan *p = hl_plan_new ();
  hl_plan_set_demo_landmarks (p);
  ck_assert_int_ge (hl_plan_add_option (p, "A", NULL), 0);
  ck_assert_int_ge (hl_plan_add_option (p, "A", NULL), 0);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_check (p, &err), HL_ERR_INVALID);
  ck_assert_msg (strstr (err.message, "Options 1 and 2") != NULL, "%s", err.message);
  /* Duplicating keeps names unique. */
  hl_option_set_name (&p->options[1], "B");
  ck_assert_int_ge (hl_plan_duplicate_option (p, 0), 0);
  ck_assert_int_ge (hl_plan_duplicate_option (p, 0), 0);
  ck_assert_str_eq (p->options[2].name, "A (copy)");
  ck_assert_str_eq (p->options[3].name, "A (copy 2)");
  ck_assert_int_eq (hl_plan_check (p, &err), HL_OK);
  /* A long multi-byte name is cut at a whole character. */
  char longname[HL_NAME_MAX];
  memset (longname, 0, sizeof longname);
  for (size_t i = 0; i + 2 < sizeof longname; i += 2)
    memcpy (longname + i, "\xc3\xa9", 2);
  hl_option_set_name (&p->options[0], longname);
  ck_assert_int_ge (hl_plan_duplicate_option (p, 0), 0);
  ck_assert_int_eq (hl_plan_check (p, &err), HL_OK);
  const char *copy = p->options[p->n_options - 1].name;
  ck_assert_msg (strstr (copy, " (copy)") != NULL, "%s", copy);
  /* A name longer than the room (as the window's entry may hand over) is
   * cut at a whole character, and the plan writes and reads back. */
  char too_long[2 * HL_NAME_MAX + 1];
  memset (too_long, 0, sizeof too_long);
  for (size_t i = 0; i + 2 < sizeof too_long; i += 2)
    memcpy (too_long + i, "\xc3\xa9", 2);
  /* the room, HL_NAME_MAX - 1 = 63 bytes, ends inside the 32nd e-acute */
  hl_option_set_name (&p->options[0], too_long);
  ck_assert_msg (g_utf8_validate (p->options[0].name, -1, NULL), "cut inside a character");
  ck_assert_uint_eq (strlen (p->options[0].name), HL_NAME_MAX - 2);
  char *written = NULL;
  size_t written_size = 0;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_to_buffer (p, &written, &written_size, &err), HL_OK);
  HlPlan *back = NULL;
  ck_assert_msg (hl_plan_load_buffer (written, written_size, "back.hlplan", &back, &err)
                 == HL_OK, "%s", err.message);
  ck_assert_str_eq (back->options[0].name, p->options[0].name);
  hl_plan_free (back);
  free (written);
  /* A byte that is not UTF-8 in a name held in memory is refused. */
  char what[96];
  ck_assert (hl_text_unsafe ("Cup \xc3", what, sizeof what) != NULL);
  ck_assert (hl_text_unsafe ("Cup \xc3\xa9", what, sizeof what) == NULL);
  hl_plan_free (p);
}
END_TEST

START_TEST (test_unsafe_names_refused)
{
  static const char *const bad[] = {
    "Cup \xe2\x80\xae" "evil",   /* U+202E right-to-left override */
    "Cup \xe2\x81\xa6x",         /* U+2066 */
    "Cup \xe2\x80\x8fx",         /* U+200F */
    "Cup \xd8\x9cx",             /* U+061C */
    "Cup &#10;two lines",        /* a line break as a character reference */
    "Cup &#x2028;x",             /* U+2028 line separator */
  };
  for (size_t i = 0; i < N_OF (bad); i++)
    {
      char opts[256];
      snprintf (opts, sizeof opts, "<options><option name=\"%s\"/></options>", bad[i]);
      char *text = demo_with (opts, NULL);
      HlPlan *plan;
      HlError err;
      ck_assert_msg (load_text (text, &plan, &err) != HL_OK, "accepted: %s", bad[i]);
      ck_assert_msg (strstr (err.message, "one line of plain text") != NULL, "%s",
                     err.message);
      /* The message never carries the character itself. */
      ck_assert_msg (strstr (err.message, "\xe2\x80\xae") == NULL
                     && strstr (err.message, "\xe2\x81\xa6") == NULL
                     && strchr (err.message, '\n') == NULL, "%s", err.message);
      free (text);
      text = demo_with ("<options/>", bad[i]);
      ck_assert_msg (load_text (text, &plan, &err) != HL_OK, "label accepted: %s", bad[i]);
      free (text);
    }
  HlPlan *p = hl_plan_new ();
  hl_plan_set_demo_landmarks (p);
  HlError err;
  snprintf (p->label, sizeof p->label, "two\nlines");
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_check (p, &err), HL_ERR_INVALID);
  ck_assert_msg (strstr (err.message, "line break") != NULL, "%s", err.message);
  snprintf (p->label, sizeof p->label, "fine \xc3\xa9 label");
  ck_assert_int_ge (hl_plan_add_option (p, "a\xe2\x80\xae" "b", NULL), 0);
  ck_assert_int_eq (hl_plan_check (p, &err), HL_ERR_INVALID);
  ck_assert_msg (strstr (err.message, "U+202E") != NULL, "%s", err.message);
  hl_plan_free (p);
}
END_TEST

/* Fields not in use are range-checked too. */
START_TEST (test_unused_fields_checked)
{
  static const struct { const char *from, *to, *word; } edits[] = {
    { "<calibration", "<calibration magnification=\"1e+308\"", "magnification" },
    { "<calibration", "<calibration magnification=\"0.5\"", "magnification" },
    { "<calibration", "<calibration marker-diameter-mm=\"-4\"", "diameter" },
    { "<calibration", "<calibration known-distance-mm=\"1e9\"", "distance" },
  };
  size_t size;
  char *demo = slurp (HL_EXAMPLE, &size);
  ck_assert_msg (strstr (demo, "<calibration method=\"assumed\"") != NULL
                 || strstr (demo, "<calibration") != NULL, "no calibration");
  for (size_t i = 0; i < N_OF (edits); i++)
    {
      /* Drop any attribute of the same name, then put the edited one. */
      char *at = strstr (demo, edits[i].from);
      ck_assert_ptr_nonnull (at);
      size_t n = size + 128;
      char *text = malloc (n);
      ck_assert_ptr_nonnull (text);
      snprintf (text, n, "%.*s%s%s", (int) (at - demo), demo, edits[i].to,
                at + strlen (edits[i].from));
      /* The demo may carry the same attribute already: strip the second. */
      const char *attr_end = strchr (edits[i].to + strlen ("<calibration "), '=');
      char attr[48];
      snprintf (attr, sizeof attr, " %.*s=\"", (int) (attr_end - edits[i].to
                                                        - strlen ("<calibration ")),
                edits[i].to + strlen ("<calibration "));
      char *first = strstr (text, attr);
      char *second = first != NULL ? strstr (first + 1, attr) : NULL;
      char *tag_end = strchr (text + (at - demo), '>');
      if (second != NULL && second < tag_end)
        {
          char *q = strchr (second + strlen (attr), '"');
          memmove (second, q + 1, strlen (q + 1) + 1);
        }
      HlPlan *plan;
      HlError err;
      ck_assert_msg (load_text (text, &plan, &err) != HL_OK, "accepted: %s", edits[i].to);
      ck_assert_msg (hl_test_contains_ci (err.message, edits[i].word)
                     || hl_test_contains_ci (err.field, edits[i].word), "%s: %s",
                     err.field, err.message);
      ck_assert_int_gt (err.line, 0);
      free (text);
    }
  free (demo);

  /* A switched-off cane with an absurd force. */
  HlPlan *p = hl_plan_new ();
  hl_plan_set_demo_landmarks (p);
  p->cane.enabled = false;
  p->cane.value = 1e300;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_check (p, &err), HL_ERR_INVALID);
  ck_assert_msg (strstr (err.field, "cane") != NULL, "%s", err.field);
  hl_plan_free (p);
}
END_TEST

/* ---- A radiograph reference: size and type before the hash -------------- */

START_TEST (test_radiograph_checked_before_hash)
{
  char *dir = make_temp_dir ();
  char big[HL_PATH_MAX], text[HL_PATH_MAX], small[HL_PATH_MAX];
  snprintf (big, sizeof big, "%s/huge.png", dir);
  snprintf (text, sizeof text, "%s/notes.png", dir);
  snprintf (small, sizeof small, "%s/small.png", dir);
  static const unsigned char png_sig[8] = { 0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n' };

  /* 600 MB that take no disk: a sparse file behind a PNG signature. */
  int fd = open (big, O_WRONLY | O_CREAT | O_TRUNC, 0600);
  ck_assert_int_ge (fd, 0);
  ck_assert_int_eq (write (fd, png_sig, sizeof png_sig), (ssize_t) sizeof png_sig);
  ck_assert_int_eq (ftruncate (fd, 600LL * 1024 * 1024), 0);
  close (fd);
  write_text (text, "just some text, not an image at all\n");
  fd = open (small, O_WRONLY | O_CREAT | O_TRUNC, 0600);
  ck_assert_int_ge (fd, 0);
  ck_assert_int_eq (write (fd, png_sig, sizeof png_sig), (ssize_t) sizeof png_sig);
  close (fd);

  char hex[65];
  HlError err;
  hl_error_clear (&err);
  double t0 = (double) clock () / CLOCKS_PER_SEC;
  ck_assert_int_eq (hl_file_sha256_hex (big, hex, &err), HL_ERR_IO);
  double took = (double) clock () / CLOCKS_PER_SEC - t0;
  ck_assert_msg (strstr (err.message, "512 MB") != NULL, "%s", err.message);
  ck_assert_msg (took < 0.5, "the size check took %.2f s of CPU: was it hashed?", took);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_file_sha256_hex (text, hex, &err), HL_ERR_PARSE);
  ck_assert_msg (strstr (err.message, "not a DICOM, PNG, TIFF or JPEG") != NULL, "%s",
                 err.message);
  hl_error_clear (&err);
  ck_assert_int_eq (hl_file_sha256_hex (small, hex, &err), HL_OK);
  /* SHA-256 of the eight signature bytes (sha256sum). */
  ck_assert_str_eq (hex, "4c4b6a3be1314ab86138bef4314dde022e600960d8689a2c8f8631802d20dab6");
  remove_tree (dir);
}
END_TEST

/* ---- Work is bounded: a time budget stops the long loops ---------------- */

static double
mono_now (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

#define HL_BUDGET_MARGIN_S 0.25   /* a loaded, shared machine's scheduling */

static void
expect_budget_stop (HlStatus st, const HlError *err, double took, double budget,
                    const char *what)
{
  ck_assert_msg (st == HL_ERR_INVALID, "%s: not stopped by the budget (status %d)", what,
                 (int) st);
  ck_assert_msg (strstr (err->message, "over the time budget") != NULL, "%s: %s", what,
                 err->message);
  ck_assert_str_eq (err->field, "time budget");
  ck_assert_msg (took < budget + HL_BUDGET_MARGIN_S, "%s: stopped after %.3f s, budget %g s",
                 what, took, budget);
}

/* The calling thread's time budget (hl-deadline.h, what batch gives each
 * plan) stops the core's long loops from inside: the Monte Carlo, the
 * sweep, the fit ranking and hashing a radiograph each return the budget's
 * refusal within a small margin of a budget that has run out, where
 * without a budget the same calls finish; and a 20 ms budget cuts the hash
 * of a 256 MB radiograph (which takes far longer) within the margin. */
START_TEST (test_budget_stops_loops)
{
  HlCatalogue *cat = NULL;
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_catalogue_load_demo (&cat, &err), HL_OK);
  ck_assert_int_eq (hl_plan_load_file (HL_EXAMPLE, &plan, &err), HL_OK);
  HlTemplate t;
  ck_assert_int_eq (hl_template_place_default (plan, cat, &t, &err), HL_OK);
  long k = hl_plan_add_option (plan, "Budget template", NULL);
  ck_assert_int_ge (k, 0);
  ck_assert_int_eq (hl_plan_set_template (plan, (size_t) k, &t, cat, &err), HL_OK);
  HlModel model;
  ck_assert_int_eq (hl_model_prepare (&model, plan, &err), HL_OK);
  const double expired = 1e-6;

  for (int budgeted = 0; budgeted < 2; budgeted++)
    {
      /* Monte Carlo: 200,000 samples of native and every option. */
      HlMcSettings s;
      hl_mc_settings_for_plan (plan, &s, NULL);
      s.n_samples = HL_MC_PLAN_SAMPLES_MAX;
      HlMcWorkspace *ws = hl_mc_workspace_new (s.n_samples, plan->n_options);
      HlMcSummary *sum = calloc (1 + plan->n_options, sizeof *sum);
      ck_assert (ws != NULL && sum != NULL);
      if (budgeted)
        hl_deadline_begin (expired);
      hl_error_clear (&err);
      double t0 = mono_now ();
      HlStatus st = hl_mc_run (ws, &model, plan->options, plan->n_options, &s, sum, NULL,
                               &err);
      double took = mono_now () - t0;
      if (budgeted)
        expect_budget_stop (st, &err, took, expired, "Monte Carlo");
      else
        ck_assert_msg (st == HL_OK, "%s", err.message);
      hl_mc_workspace_free (ws);
      free (sum);

      /* A sweep of every step a sweep may have. */
      HlSweepSpec spec = { HL_SWEEP_FEMORAL_OFFSET, -10.0, 10.0,
                           HL_SWEEP_ROWS_MAX / (1 + plan->n_options), HL_SWEEP_MODE_ADD };
      size_t n_res = (1 + plan->n_options) * spec.n_steps;
      HlResult *res = calloc (n_res, sizeof *res);
      ck_assert_ptr_nonnull (res);
      hl_error_clear (&err);
      t0 = mono_now ();
      st = hl_sweep_run (plan, &model, &spec, NULL, res, NULL, n_res, &err);
      took = mono_now () - t0;
      if (budgeted)
        {
          expect_budget_stop (st, &err, took, expired, "sweep");
          ck_assert (isnan (res[n_res - 1].jrf_n));     /* not computed: no number */
        }
      else
        ck_assert_msg (st == HL_OK, "%s", err.message);
      free (res);

      /* The fit ranking over every size, with its Monte Carlo. */
      HlFitTable table;
      hl_error_clear (&err);
      t0 = mono_now ();
      st = hl_fit_rank (plan, (size_t) k, cat, HL_FIT_SIZES, &table, &err);
      took = mono_now () - t0;
      if (budgeted)
        expect_budget_stop (st, &err, took, expired, "fit ranking");
      else
        ck_assert_msg (st == HL_OK, "%s", err.message);
      hl_fit_table_clear (&table);
      hl_deadline_end ();
    }

  /* Hashing 256 MB (sparse, behind a PNG signature). */
  char *dir = make_temp_dir ();
  char big[HL_PATH_MAX];
  snprintf (big, sizeof big, "%s/large.png", dir);
  static const unsigned char png_sig[8] = { 0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n' };
  int fd = open (big, O_WRONLY | O_CREAT | O_TRUNC, 0600);
  ck_assert_int_ge (fd, 0);
  ck_assert_int_eq (write (fd, png_sig, sizeof png_sig), (ssize_t) sizeof png_sig);
  ck_assert_int_eq (ftruncate (fd, 256LL * 1024 * 1024), 0);
  close (fd);
  char hex[65];
  double t0 = mono_now ();
  ck_assert_int_eq (hl_file_sha256_hex (big, hex, &err), HL_OK);
  double full = mono_now () - t0;
  const double budget = 0.02;
  hl_deadline_begin (budget);
  t0 = mono_now ();
  HlStatus st = hl_file_sha256_hex (big, hex, &err);
  double took = mono_now () - t0;
  hl_deadline_end ();
  expect_budget_stop (st, &err, took, budget, "hashing");
  ck_assert_msg (took < full, "cut at %.3f s, the whole hash took %.3f s", took, full);
  remove_tree (dir);
  hl_plan_free (plan);
  hl_catalogue_free (cat);
}
END_TEST

/* ---- Every output reads back --------------------------------------------- */

static uint64_t rng_state = 0x9E3779B97F4A7C15ull;

/* xorshift64 (Marsaglia 2003, J Stat Softw 8(14)). */
static uint64_t
rng_next (void)
{
  rng_state ^= rng_state << 13;
  rng_state ^= rng_state >> 7;
  rng_state ^= rng_state << 17;
  return rng_state;
}

static double
rng_uniform (double lo, double hi)
{
  return lo + (hi - lo) * ((double) (rng_next () >> 11) / 9007199254740992.0);
}

static const char *const name_pieces[] = {
  "a", "Z", "7", " ", ",", ";", "\"", "'", "&", "<", ">", "=", "+", "-", "@",
  "\xc3\xa9", "\xe2\x86\x92", "\xf0\x9f\xa6\xb4", "]]>", "&amp;",
};

static void
random_name (char *out, size_t size, int index)
{
  size_t len = 0;
  out[0] = '\0';
  size_t want = (size_t) (rng_next () % size);
  while (len < want)
    {
      const char *piece = name_pieces[rng_next () % N_OF (name_pieces)];
      size_t n = strlen (piece);
      if (len + n + 8 >= size)
        break;
      memcpy (out + len, piece, n + 1);
      len += n;
    }
  snprintf (out + len, size - len, "#%d", index);
}

static size_t
count_text (const char *hay, const char *needle)
{
  size_t n = 0;
  for (const char *p = strstr (hay, needle); p != NULL; p = strstr (p + 1, needle))
    n++;
  return n;
}

/* Moves the plan's geometry so that a good share of the plans cannot be
 * solved, in each of the ways a plan that loads can fail: case k % 4 == 1
 * puts the abductor landmarks anywhere near the hip centre (lines through
 * or medial to it, origin and insertion too close: native refused, which
 * leaves nothing to solve, as preparing the model solves native), 2 tilts the inter-teardrop line by up to 60 degrees (no
 * row can be prepared), 3 gives the options femoral shifts of up to the
 * 50 mm the file allows (some options refused, native solved). */
static void
unsettle (HlPlan *plan, int k)
{
  HlLandmarks *lm = &plan->landmarks;
  HlVec2 hc = lm->p[HL_LM_HIP_CENTRE];
  switch (k % 4)
    {
    case 1:
      hl_landmarks_set (lm, HL_LM_ABDUCTOR_ORIGIN, hc.x + rng_uniform (-60, 60),
                        hc.y + rng_uniform (-20, 100));
      hl_landmarks_set (lm, HL_LM_ABDUCTOR_INSERTION, hc.x + rng_uniform (-60, 60),
                        hc.y + rng_uniform (-60, 20));
      break;
    case 2:
      {
        HlVec2 a = lm->p[HL_LM_TEARDROP];
        double w = 124.0, t = rng_uniform (-60, 60) * 3.14159265358979 / 180.0;
        hl_landmarks_set (lm, HL_LM_TEARDROP_OTHER, a.x + w * cos (t), a.y + w * sin (t));
      }
      break;
    case 3:
      for (size_t i = 0; i < plan->n_options; i++)
        {
          plan->options[i].recon.femoral_offset_mm = rng_uniform (-50, 50);
          plan->options[i].recon.femoral_length_mm = rng_uniform (-50, 50);
          plan->options[i].recon.cup_medial_mm = rng_uniform (-50, 50);
        }
      break;
    default:
      break;
    }
}

/* The property: every plan that loads, solvable or not, gives a planning
 * summary that loads, under the size limit, and gives the same plan back;
 * each row the solver refuses has a <refusal> in its place and no numbers,
 * a plan that cannot be prepared one <refusal kind="plan">, and the
 * uncertainty ranges are there exactly when no <refusal
 * kind="uncertainty"> says why not. */
START_TEST (test_summary_of_every_plan_loads)
{
  int n_loaded = 0, n_all_solved = 0, n_plan_refused = 0, n_abductor_refused = 0,
      n_option_refused = 0;
  size_t size;
  char *demo = slurp (HL_EXAMPLE, &size);
  HlPlan *base = NULL;
  HlError err;
  ck_assert_int_eq (load_text (demo, &base, &err), HL_OK);
  free (demo);
  for (int k = 0; k < 200; k++)
    {
      HlPlan *plan = hl_plan_copy (base);
      ck_assert_ptr_nonnull (plan);
      while (plan->n_options > 0)
        hl_plan_remove_option (plan, 0);
      /* The largest plans first: 64 options with the longest names. */
      int n = k < 20 ? HL_PLAN_MAX_OPTIONS : (int) (rng_next () % (HL_PLAN_MAX_OPTIONS + 1));
      random_name (plan->label, k < 20 ? sizeof plan->label : 40, 0);
      for (int i = 0; i < n; i++)
        {
          HlRecon rc;
          char name[HL_NAME_MAX];
          hl_recon_init (&rc);
          rc.cup_medial_mm = rng_uniform (-5, 8);
          rc.femoral_offset_mm = rng_uniform (-8, 10);
          rc.femoral_length_mm = rng_uniform (-8, 10);
          rc.head_length_mm = rng_uniform (-4, 8);
          random_name (name, k < 20 ? sizeof name : 24, i + 1);
          ck_assert_int_ge (hl_plan_add_option (plan, name, &rc), 0);
        }
      unsettle (plan, k);
      size_t nl = 0;
      while (nl + 5 < sizeof plan->notes && (k < 20 || nl < 200))
        {
          memcpy (plan->notes + nl, k % 2 ? "&<>\"\n" : "x\xc3\xa9 ", 5);
          nl += 5;
        }
      plan->notes[nl] = '\0';

      char *text = NULL;
      size_t n_text = 0;
      hl_error_clear (&err);
      ck_assert_msg (hl_plan_to_buffer (plan, &text, &n_text, &err) == HL_OK, "%s",
                     err.message);
      HlPlan *loaded = NULL;
      if (hl_plan_load_buffer (text, n_text, "p.hlplan", &loaded, &err) != HL_OK)
        {
          /* Only a moved geometry may be refused on loading. */
          ck_assert_msg (k % 4 != 0, "case %d: the plan does not load: %s", k, err.message);
          hl_plan_free (plan);
          free (text);
          continue;
        }
      n_loaded++;
      char *summary = NULL;
      size_t n_summary = 0;
      ck_assert_msg (hl_summary_to_buffer (loaded, "2026-01-01T00:00:00Z", &summary,
                                           &n_summary, &err) == HL_OK,
                     "case %d: a loaded plan gives no summary: %s", k, err.message);
      ck_assert_msg (n_summary < HL_PLAN_MAX_BYTES, "case %d: summary of %zu bytes", k,
                     n_summary);
      HlPlan *back = NULL;
      ck_assert_msg (hl_plan_load_buffer (summary, n_summary, "s.xml", &back, &err) == HL_OK,
                     "case %d: the summary does not load: %s", k, err.message);
      ck_assert_uint_eq (back->n_options, loaded->n_options);
      for (size_t i = 0; i < back->n_options; i++)
        ck_assert_str_eq (back->options[i].name, loaded->options[i].name);
      ck_assert_str_eq (back->label, loaded->label);

      /* What the solver refuses, row by row, against the summary. */
      HlModel model;
      HlError prep;
      hl_error_clear (&prep);
      size_t rows = 1 + loaded->n_options;
      size_t n_results = count_text (summary, "<result kind=");
      size_t n_refusals = count_text (summary, "<refusal kind=");
      size_t n_mc_refused = count_text (summary, "<refusal kind=\"uncertainty\"");
      if (hl_model_prepare (&model, loaded, &prep) != HL_OK)
        {
          n_plan_refused++;
          if (strncmp (prep.field, "landmark abductor", 17) == 0)
            n_abductor_refused++;     /* native's line: prepare solves native */
          ck_assert_msg (n_results == 0 && n_refusals == 1
                         && count_text (summary, "<refusal kind=\"plan\"") == 1,
                         "case %d: a plan that cannot be prepared: %zu results, "
                         "%zu refusals", k, n_results, n_refusals);
          ck_assert_msg (strstr (summary, prep.field) != NULL, "case %d: no field %s", k,
                         prep.field);
        }
      else
        {
          HlResult *res = calloc (rows, sizeof *res);
          HlStatus *row_st = calloc (rows, sizeof *row_st);
          ck_assert (res != NULL && row_st != NULL);
          hl_model_solve_rows (&model, loaded, res, row_st, NULL);
          size_t n_solved = 0, n_refused_options = 0;
          for (size_t i = 0; i < rows; i++)
            {
              n_solved += row_st[i] == HL_OK;
              n_refused_options += i > 0 && row_st[i] != HL_OK;
            }
          ck_assert_msg (n_results == n_solved, "case %d: %zu results, %zu rows solved", k,
                         n_results, n_solved);
          ck_assert_uint_eq (count_text (summary, "<refusal kind=\"option\""),
                             n_refused_options);
          ck_assert_uint_eq (count_text (summary, "<refusal kind=\"native\""),
                             row_st[0] != HL_OK);
          if (row_st[0] != HL_OK)
            ck_assert_uint_eq (n_mc_refused, 1);
          if (n_refused_options > 0)
            n_option_refused++;
          if (n_solved == rows)
            n_all_solved++;
          /* The ranges on every result, or on none and the reason said. */
          ck_assert_uint_eq (count_text (summary, " jrf-bw-p05="),
                             n_mc_refused ? 0 : n_results);
          ck_assert_uint_eq (n_refusals, rows - n_solved + n_mc_refused);
          free (res);
          free (row_st);
        }
      hl_plan_free (back);
      hl_plan_free (loaded);
      hl_plan_free (plan);
      free (summary);
      free (text);
    }
  hl_plan_free (base);
  /* Every kind of plan was met. */
  ck_assert_msg (n_loaded >= 150 && n_all_solved > 0
                 && n_plan_refused > n_abductor_refused && n_abductor_refused > 0
                 && n_option_refused > 0,
                 "loaded %d: all solved %d, plan refused %d (%d for native's abductor "
                 "line), an option refused %d", n_loaded, n_all_solved, n_plan_refused,
                 n_abductor_refused, n_option_refused);
}
END_TEST

/* ---- Text that cannot mislead ------------------------------------------ */

START_TEST (test_utf8_cut)
{
  /* "é" is two bytes, "→" three, the bone four. */
  const char *s = "a\xc3\xa9\xe2\x86\x92\xf0\x9f\xa6\xb4z";
  static const size_t want[] = { 0, 1, 1, 3, 3, 3, 6, 6, 6, 6, 10, 11, 11 };
  for (size_t max = 0; max < N_OF (want); max++)
    ck_assert_uint_eq (hl_utf8_cut (s, max), want[max]);
  /* An error message cut short ends on a whole character. */
  char big[HL_ERROR_MESSAGE_MAX * 2];
  size_t n = 0;
  while (n + 3 < sizeof big)
    {
      memcpy (big + n, "\xe2\x86\x92", 3);
      n += 3;
    }
  big[n] = '\0';
  for (int shift = 0; shift < 3; shift++)
    {
      HlError err;
      hl_error_set (&err, HL_ERR_INVALID, big + shift, "%.*s%s", shift, "xx", big);
      size_t len = strlen (err.message);
      ck_assert_uint_lt (len, sizeof err.message);
      ck_assert_uint_eq (hl_utf8_cut (err.message, len), len);
      ck_assert_uint_eq ((len - (size_t) shift) % 3, 0);
      size_t flen = strlen (err.field);
      /* The field starts mid-character (shift): count whole ones after. */
      ck_assert_uint_eq ((flen + (size_t) shift) % 3, 0);
    }
  char q[64];
  ck_assert_str_eq (hl_text_quote ("ab\xe2\x80\xae" "cd\n", 40, q, sizeof q), "ab?cd?");
  /* Cut: at a whole character, and "…" says so, within the 5 bytes. */
  ck_assert_str_eq (hl_text_quote ("\xc3\xa9\xc3\xa9\xc3\xa9", 5, q, sizeof q),
                    "\xc3\xa9\xe2\x80\xa6");
  ck_assert_str_eq (hl_text_quote ("\xc3\xa9\xc3\xa9\xc3\xa9", 6, q, sizeof q),
                    "\xc3\xa9\xc3\xa9\xc3\xa9");
  ck_assert_str_eq (hl_text_quote ("abcdefgh", 7, q, sizeof q), "abcd\xe2\x80\xa6");
}
END_TEST

/* ---- Text that cannot mislead ------------------------------------------ */

/* Every parser message is in our words, with the line: nothing of
 * libxml2's own vocabulary ("use XML_PARSE_HUGE option"). */
START_TEST (test_parser_messages_ours)
{
  static const char head[] = "<?xml version=\"1.0\"?>\n"
                             "<plan xmlns=\"urn:hiplever:plan\" format-version=\"1\">\n";
  static const char *const leaks[] = {
    "XML_PARSE", "xmlSAX2", "libxml", "Premature", "Opening and ending", "Couldn't",
    "StartTag", "EndTag", "AttValue", "xmlParse", "Excessive",
  };
  enum { N_DOCS = 9 };
  char *docs[N_DOCS];
  size_t n = 0;
  /* Deeper than libxml2's limit of 256. */
  size_t cap = sizeof head + 300 * 8 + 32;
  docs[n] = malloc (cap);
  ck_assert_ptr_nonnull (docs[n]);
  strcpy (docs[n], head);
  for (int i = 0; i < 300; i++)
    strcat (docs[n], "<a>");
  for (int i = 0; i < 300; i++)
    strcat (docs[n], "</a>");
  strcat (docs[n], "</plan>\n");
  n++;
  /* A name over libxml2's 50,000-byte limit. */
  docs[n] = malloc (sizeof head + 60016);
  ck_assert_ptr_nonnull (docs[n]);
  strcpy (docs[n], head);
  strcat (docs[n], "<");
  memset (docs[n] + strlen (docs[n]), 'n', 60000);
  docs[n][sizeof head - 1 + 1 + 60000] = '\0';
  strcat (docs[n], "/></plan>\n");
  n++;
  static const char *const small[] = {
    "<case></cas>\n</plan>\n",
    "<case label=\"a&nope;b\"/>\n</plan>\n",
    "<case label=\"a\" label=\"b\"/>\n</plan>\n",
    "<case label=\"a<b\"/>\n</plan>\n",
    "<case label=\"\xff\xfe\"/>\n</plan>\n",
    "<case label=\"x\"/>\n",
    "<x:case label=\"x\"/>\n</plan>\n",
  };
  for (size_t i = 0; i < N_OF (small) && n < N_DOCS; i++)
    {
      docs[n] = malloc (sizeof head + strlen (small[i]));
      ck_assert_ptr_nonnull (docs[n]);
      strcpy (docs[n], head);
      strcat (docs[n], small[i]);
      n++;
    }
  for (size_t i = 0; i < n; i++)
    {
      HlPlan *plan;
      HlError err;
      ck_assert_int_ne (load_text (docs[i], &plan, &err), HL_OK);
      for (size_t k = 0; k < N_OF (leaks); k++)
        ck_assert_msg (strstr (err.message, leaks[k]) == NULL, "document %zu: %s", i,
                       err.message);
      ck_assert_msg (strstr (err.message, "line ") != NULL && err.line > 0,
                     "document %zu has no line: %s", i, err.message);
      free (docs[i]);
    }
}
END_TEST

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
      GString *b = g_string_new (NULL);
      hl_csv_field_append (b, cases[i].in);
      ck_assert_str_eq (b->str, cases[i].out);
      g_string_free (b, TRUE);
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
  tcase_add_test (tc, test_long_names_backup);
  tcase_add_test (tc, test_budget_stops_loops);
  tcase_add_test (tc, test_same_file);
  suite_add_tcase (s, tc);
  tc = tcase_create ("radiograph");
  tcase_add_test (tc, test_radiograph_checked_before_hash);
  suite_add_tcase (s, tc);
  tc = tcase_create ("plans");
  tcase_add_test (tc, test_option_limit_on_load);
  tcase_add_test (tc, test_duplicate_names);
  tcase_add_test (tc, test_unsafe_names_refused);
  tcase_add_test (tc, test_unused_fields_checked);
  tcase_set_timeout (tc, 120);
  tcase_add_test (tc, test_summary_of_every_plan_loads);
  suite_add_tcase (s, tc);
  tc = tcase_create ("text");
  tcase_add_test (tc, test_utf8_cut);
  tcase_add_test (tc, test_parser_messages_ours);
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
