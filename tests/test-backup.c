/* test-backup.c: the previous version kept on save (PLAN.hlplan~), and
 * saves that fail half-way.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Run without arguments: the backup tests.  Run with --fault under
 * LD_PRELOAD=libhl-fault-write.so (tests/hl-fault-write.c): every write to
 * the temporary file stops after a set number of bytes with ENOSPC, as on
 * a full disk; the file being replaced and its backup must stay as they
 * were and no temporary file may be left.
 */
#include "config.h"

#include <dirent.h>
#include <dlfcn.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "hl-plan-io.h"
#include "hl-test-util.h"

#define HL_PATH_MAX 4096
#define HL_PLAN_NAME "case.hlplan"
/* Body masses of the successive versions: easy to tell apart on reading. */
static const double version_mass_kg[] = { 61.25, 73.75, 88.5 };
#define N_OF(a) (sizeof (a) / sizeof (a)[0])

static HlPlan *
plan_of_mass (double mass_kg)
{
  HlPlan *plan = hl_plan_new ();
  ck_assert_ptr_nonnull (plan);
  hl_plan_set_demo_landmarks (plan);
  plan->mass_kg = mass_kg;
  snprintf (plan->label, sizeof plan->label, "Backup case %.2f", mass_kg);
  return plan;
}

static char *
make_temp_dir (void)
{
  char *dir = strdup ("/tmp/hl-test-backup-XXXXXX");
  ck_assert_ptr_nonnull (dir);
  ck_assert_msg (mkdtemp (dir) != NULL, "mkdtemp: %s", strerror (errno));
  return dir;
}

static void
remove_tree (char *dir)
{
  char cmd[HL_PATH_MAX + 32];
  snprintf (cmd, sizeof cmd, "chmod -R u+w '%s'; rm -rf '%s'", dir, dir);
  ck_assert_int_eq (system (cmd), 0);
  free (dir);
}

/* Names in dir, sorted, joined by spaces: "case.hlplan case.hlplan~". */
static void
list_dir (const char *dir, char *out, size_t size)
{
  struct dirent **names = NULL;
  int n = scandir (dir, &names, NULL, alphasort);
  ck_assert_int_ge (n, 0);
  out[0] = '\0';
  for (int i = 0; i < n; i++)
    {
      if (strcmp (names[i]->d_name, ".") != 0 && strcmp (names[i]->d_name, "..") != 0)
        {
          if (out[0] != '\0')
            strncat (out, " ", size - strlen (out) - 1);
          strncat (out, names[i]->d_name, size - strlen (out) - 1);
        }
      free (names[i]);
    }
  free (names);
}

static double
mass_in (const char *path)
{
  HlPlan *plan = NULL;
  HlError err;
  hl_error_clear (&err);
  ck_assert_msg (hl_plan_load_file (path, &plan, &err) == HL_OK, "%s: %s", path, err.message);
  double mass = plan->mass_kg;
  hl_plan_free (plan);
  return mass;
}

static char *
read_whole (const char *path, size_t *size)
{
  FILE *f = fopen (path, "rb");
  ck_assert_msg (f != NULL, "%s: %s", path, strerror (errno));
  ck_assert_int_eq (fseek (f, 0, SEEK_END), 0);
  long n = ftell (f);
  ck_assert_int_ge (n, 0);
  rewind (f);
  char *data = malloc ((size_t) n + 1);
  ck_assert_ptr_nonnull (data);
  ck_assert_uint_eq (fread (data, 1, (size_t) n, f), (size_t) n);
  fclose (f);
  data[n] = '\0';
  *size = (size_t) n;
  return data;
}

static void
save_version (const char *path, size_t version)
{
  HlPlan *plan = plan_of_mass (version_mass_kg[version]);
  HlError err;
  hl_error_clear (&err);
  ck_assert_msg (hl_plan_save_file_backup (plan, path, &err) == HL_OK, "save %zu: %s",
                 version, err.message);
  hl_plan_free (plan);
}

/* ---- backups ------------------------------------------------------------ */

/* Saves 1..N versions: the file holds the last, the backup the one before;
 * the first save of a new file makes no backup. */
static const struct {
  size_t saves;
  const char *listing;
} backup_cases[] = {
  { 1, HL_PLAN_NAME },
  { 2, HL_PLAN_NAME " " HL_PLAN_NAME HL_PLAN_BACKUP_SUFFIX },
  { 3, HL_PLAN_NAME " " HL_PLAN_NAME HL_PLAN_BACKUP_SUFFIX },
};

START_TEST (test_backup_holds_previous)
{
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX], backup[HL_PATH_MAX + sizeof HL_PLAN_BACKUP_SUFFIX], listing[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/" HL_PLAN_NAME, dir);
  snprintf (backup, sizeof backup, "%s" HL_PLAN_BACKUP_SUFFIX, path);

  for (size_t v = 0; v < backup_cases[_i].saves; v++)
    save_version (path, v);
  list_dir (dir, listing, sizeof listing);
  ck_assert_str_eq (listing, backup_cases[_i].listing);
  ck_assert_double_eq_tol (mass_in (path), version_mass_kg[backup_cases[_i].saves - 1],
                           HL_TEST_TOL_BW);
  if (backup_cases[_i].saves > 1)
    ck_assert_double_eq_tol (mass_in (backup), version_mass_kg[backup_cases[_i].saves - 2],
                             HL_TEST_TOL_BW);
  remove_tree (dir);
}
END_TEST

/* The backup is the old file's own bytes, whatever they were. */
START_TEST (test_backup_keeps_bytes)
{
  static const char old_bytes[] = "not a plan, but the user's bytes\n";
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX], backup[HL_PATH_MAX + sizeof HL_PLAN_BACKUP_SUFFIX];
  snprintf (path, sizeof path, "%s/" HL_PLAN_NAME, dir);
  snprintf (backup, sizeof backup, "%s" HL_PLAN_BACKUP_SUFFIX, path);
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_write_file_atomic (path, old_bytes, sizeof old_bytes - 1, &err), HL_OK);
  ck_assert_int_eq (access (backup, F_OK), -1);
  save_version (path, 0);
  size_t size = 0;
  char *kept = read_whole (backup, &size);
  ck_assert_uint_eq (size, sizeof old_bytes - 1);
  ck_assert_mem_eq (kept, old_bytes, size);
  free (kept);
  remove_tree (dir);
}
END_TEST

/* A plain atomic save never makes a backup. */
START_TEST (test_plain_save_no_backup)
{
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX], listing[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/" HL_PLAN_NAME, dir);
  HlPlan *plan = plan_of_mass (version_mass_kg[0]);
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_save_file (plan, path, &err), HL_OK);
  ck_assert_int_eq (hl_plan_save_file (plan, path, &err), HL_OK);
  list_dir (dir, listing, sizeof listing);
  ck_assert_str_eq (listing, HL_PLAN_NAME);
  hl_plan_free (plan);
  remove_tree (dir);
}
END_TEST

/* When the backup cannot be made the save is refused with a message naming
 * the backup, and the file, the thing in the backup's way and the folder
 * are left as they were. */
START_TEST (test_backup_blocked)
{
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX], backup[HL_PATH_MAX + sizeof HL_PLAN_BACKUP_SUFFIX], listing[HL_PATH_MAX];
  snprintf (path, sizeof path, "%s/" HL_PLAN_NAME, dir);
  snprintf (backup, sizeof backup, "%s" HL_PLAN_BACKUP_SUFFIX, path);
  save_version (path, 0);
  ck_assert_int_eq (mkdir (backup, 0755), 0);

  HlPlan *plan = plan_of_mass (version_mass_kg[1]);
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_save_file_backup (plan, path, &err), HL_ERR_IO);
  ck_assert_msg (strstr (err.message, HL_PLAN_NAME HL_PLAN_BACKUP_SUFFIX) != NULL, "%s",
                 err.message);
  ck_assert_msg (strstr (err.message, "not changed") != NULL, "%s", err.message);
  ck_assert_double_eq_tol (mass_in (path), version_mass_kg[0], HL_TEST_TOL_BW);
  list_dir (dir, listing, sizeof listing);
  ck_assert_str_eq (listing, HL_PLAN_NAME " " HL_PLAN_NAME HL_PLAN_BACKUP_SUFFIX);
  struct stat sb;
  ck_assert_int_eq (stat (backup, &sb), 0);
  ck_assert (S_ISDIR (sb.st_mode));
  hl_plan_free (plan);
  remove_tree (dir);
}
END_TEST

/* ---- saves that fail half-way (under the shim) -------------------------- */

/* Bytes the temporary file may take before the disk is "full": none, one,
 * a few hundred, and all but the last byte of the plan. */
static const long fault_after[] = { 0, 1, 317, -1 };

START_TEST (test_shim_loaded)
{
  void *program = dlopen (NULL, RTLD_NOW);
  ck_assert_ptr_nonnull (program);
  ck_assert_msg (dlsym (program, "hl_fault_write_active") != NULL,
                 "run --fault with LD_PRELOAD=libhl-fault-write.so");
}
END_TEST

static void
fault_case (size_t i, bool backup)
{
  char *dir = make_temp_dir ();
  char path[HL_PATH_MAX], bak[HL_PATH_MAX + sizeof HL_PLAN_BACKUP_SUFFIX], listing[HL_PATH_MAX], after[32],
       match[HL_PATH_MAX + sizeof HL_PLAN_NAME];
  snprintf (path, sizeof path, "%s/" HL_PLAN_NAME, dir);
  snprintf (bak, sizeof bak, "%s" HL_PLAN_BACKUP_SUFFIX, path);
  /* The temporary file is ".hlXXXXXX" in the same folder. */
  snprintf (match, sizeof match, "%s/.hl", dir);
  save_version (path, 0);
  save_version (path, 1);
  size_t old_size = 0, bak_size = 0;
  char *old_bytes = read_whole (path, &old_size);
  char *bak_bytes = read_whole (bak, &bak_size);

  HlPlan *plan = plan_of_mass (version_mass_kg[2]);
  char *text = NULL;
  size_t size = 0;
  HlError err;
  hl_error_clear (&err);
  ck_assert_int_eq (hl_plan_to_buffer (plan, &text, &size, &err), HL_OK);
  long limit = fault_after[i] >= 0 ? fault_after[i] : (long) size - 1;
  snprintf (after, sizeof after, "%ld", limit);
  setenv ("HL_FAULT_WRITE_AFTER", after, 1);
  setenv ("HL_FAULT_WRITE_MATCH", match, 1);

  HlStatus st = backup ? hl_plan_save_file_backup (plan, path, &err)
                       : hl_plan_save_file (plan, path, &err);
  unsetenv ("HL_FAULT_WRITE_AFTER");
  ck_assert_msg (st == HL_ERR_IO, "a save stopped after %ld bytes returned %s", limit,
                 hl_status_name (st));
  ck_assert_msg (strstr (err.message, HL_PLAN_NAME) != NULL
                 && strstr (err.message, strerror (ENOSPC)) != NULL, "%s", err.message);

  size_t now_size = 0;
  char *now = read_whole (path, &now_size);
  ck_assert_uint_eq (now_size, old_size);
  ck_assert_mem_eq (now, old_bytes, old_size);
  free (now);
  now = read_whole (bak, &now_size);
  ck_assert_uint_eq (now_size, bak_size);
  ck_assert_mem_eq (now, bak_bytes, bak_size);
  free (now);
  list_dir (dir, listing, sizeof listing);
  ck_assert_str_eq (listing, HL_PLAN_NAME " " HL_PLAN_NAME HL_PLAN_BACKUP_SUFFIX);

  /* The same save goes through once the disk has room again. */
  hl_error_clear (&err);
  ck_assert_int_eq (backup ? hl_plan_save_file_backup (plan, path, &err)
                           : hl_plan_save_file (plan, path, &err), HL_OK);
  ck_assert_double_eq_tol (mass_in (path), version_mass_kg[2], HL_TEST_TOL_BW);

  free (text);
  free (old_bytes);
  free (bak_bytes);
  hl_plan_free (plan);
  remove_tree (dir);
}

START_TEST (test_fault_plain)
{
  fault_case ((size_t) _i, false);
}
END_TEST

START_TEST (test_fault_backup)
{
  fault_case ((size_t) _i, true);
}
END_TEST

static Suite *
backup_suite (bool fault)
{
  Suite *s = suite_create (fault ? "backup-fault" : "backup");
  TCase *tc;

  if (fault)
    {
      tc = tcase_create ("half-way");
      tcase_add_test (tc, test_shim_loaded);
      tcase_add_loop_test (tc, test_fault_plain, 0, N_OF (fault_after));
      tcase_add_loop_test (tc, test_fault_backup, 0, N_OF (fault_after));
      suite_add_tcase (s, tc);
      return s;
    }
  tc = tcase_create ("backup");
  tcase_add_loop_test (tc, test_backup_holds_previous, 0, N_OF (backup_cases));
  tcase_add_test (tc, test_backup_keeps_bytes);
  tcase_add_test (tc, test_plain_save_no_backup);
  tcase_add_test (tc, test_backup_blocked);
  suite_add_tcase (s, tc);
  return s;
}

int
main (int argc, char **argv)
{
  bool fault = argc > 1 && strcmp (argv[1], "--fault") == 0;
  if (argc > 1 && !fault)
    {
      fprintf (stderr, "test-backup: unknown argument '%s' (only --fault)\n", argv[1]);
      return 2;
    }
  return hl_test_run (backup_suite (fault));
}
