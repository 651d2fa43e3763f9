/* hl-fuzz-replay.c: runs a fuzz target over saved inputs, without libFuzzer.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 *   hl-fuzz-replay-load FILE-OR-FOLDER...
 *
 * Each file (folders: every regular file in them, in name order) is passed
 * once to LLVMFuzzerTestOneInput; a broken property aborts, which fails the
 * test.  Finding no input at all is a failure too: a replay of nothing
 * would pass whatever the code did.
 */
#include "config.h"

#include <dirent.h>
#include <errno.h>
#include <string.h>
#include <sys/stat.h>

#include "hl-fuzz.h"

/* Inputs kept for replay stay small; a bigger file is a mistake. */
#define HL_REPLAY_MAX_BYTES (16u * 1024u * 1024u)

static int
replay_file (const char *path)
{
  FILE *f = fopen (path, "rb");
  if (f == NULL)
    {
      fprintf (stderr, "%s: %s\n", path, strerror (errno));
      return -1;
    }
  uint8_t *data = malloc (HL_REPLAY_MAX_BYTES);
  if (data == NULL)
    {
      fclose (f);
      fprintf (stderr, "%s: out of memory\n", path);
      return -1;
    }
  size_t n = fread (data, 1, HL_REPLAY_MAX_BYTES, f);
  int bad = ferror (f) || !feof (f);
  fclose (f);
  if (bad)
    {
      free (data);
      fprintf (stderr, "%s: unreadable or over %u bytes\n", path, HL_REPLAY_MAX_BYTES);
      return -1;
    }
  /* libFuzzer hands over a copy of exactly n bytes; so do we, so that
   * AddressSanitizer sees any read past the end. */
  uint8_t *exact = malloc (n ? n : 1);
  if (exact == NULL)
    {
      free (data);
      return -1;
    }
  memcpy (exact, data, n);
  free (data);
  fprintf (stderr, "replay %s (%zu bytes)\n", path, n);
  LLVMFuzzerTestOneInput (exact, n);
  free (exact);
  return 1;
}

static int
name_cmp (const struct dirent **a, const struct dirent **b)
{
  return strcmp ((*a)->d_name, (*b)->d_name);
}

static int
replay_path (const char *path)
{
  struct stat st;
  if (stat (path, &st) != 0)
    {
      fprintf (stderr, "%s: %s\n", path, strerror (errno));
      return -1;
    }
  if (!S_ISDIR (st.st_mode))
    return replay_file (path);

  struct dirent **names = NULL;
  int n = scandir (path, &names, NULL, name_cmp);
  if (n < 0)
    {
      fprintf (stderr, "%s: %s\n", path, strerror (errno));
      return -1;
    }
  int count = 0;
  for (int i = 0; i < n; i++)
    {
      char child[4096];
      struct stat cst;
      if (names[i]->d_name[0] != '.'
          && snprintf (child, sizeof child, "%s/%s", path, names[i]->d_name)
             < (int) sizeof child
          && stat (child, &cst) == 0 && S_ISREG (cst.st_mode))
        {
          int r = replay_file (child);
          if (r < 0)
            count = -1;
          else if (count >= 0)
            count += r;
        }
      free (names[i]);
    }
  free (names);
  return count;
}

int
main (int argc, char **argv)
{
  int total = 0;

  for (int i = 1; i < argc; i++)
    {
      int r = replay_path (argv[i]);
      if (r < 0)
        return EXIT_FAILURE;
      total += r;
    }
  if (total == 0)
    {
      fprintf (stderr, "no input to replay\n");
      return EXIT_FAILURE;
    }
  fprintf (stderr, "%d inputs replayed, no property broken\n", total);
  return EXIT_SUCCESS;
}
