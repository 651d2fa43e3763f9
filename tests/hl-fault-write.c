/* hl-fault-write.c: a preloaded shim that makes write() fail half-way, for
 * the fault-injection tests (tests/test-backup.c --fault).  Never linked
 * into the programs.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * LD_PRELOAD=libhl-fault-write.so, then, read on every call:
 *   HL_FAULT_WRITE_MATCH  a substring of the path of the files to hit
 *   HL_FAULT_WRITE_AFTER  bytes each such file may take; the write that
 *                         would pass them writes up to the limit, the next
 *                         fails with ENOSPC, as a full disk does.
 * Other files, and every file while either variable is unset, are
 * written as usual.
 */
#define _GNU_SOURCE
#include <dlfcn.h>
#include <errno.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#define HL_FAULT_SLOTS 64

typedef ssize_t (*HlWriteFn) (int fd, const void *buf, size_t count);

/* Bytes written so far to each file hit, by inode: a new temporary file
 * starts from nothing even when it reuses a descriptor number. */
static struct {
  dev_t dev;
  ino_t ino;
  size_t written;
  int used;
} slots[HL_FAULT_SLOTS];

/* Tells a test that the shim is loaded. */
int hl_fault_write_active (void);
int
hl_fault_write_active (void)
{
  return 1;
}

static size_t *
budget_used (int fd)
{
  const char *match = getenv ("HL_FAULT_WRITE_MATCH");
  char link[64];
  char path[PATH_MAX];
  struct stat st;

  if (match == NULL || *match == '\0' || getenv ("HL_FAULT_WRITE_AFTER") == NULL)
    return NULL;
  snprintf (link, sizeof link, "/proc/self/fd/%d", fd);
  ssize_t n = readlink (link, path, sizeof path - 1);
  if (n <= 0)
    return NULL;
  path[n] = '\0';
  if (strstr (path, match) == NULL || fstat (fd, &st) != 0 || !S_ISREG (st.st_mode))
    return NULL;
  for (int i = 0; i < HL_FAULT_SLOTS; i++)
    if (slots[i].used && slots[i].dev == st.st_dev && slots[i].ino == st.st_ino)
      return &slots[i].written;
  for (int i = 0; i < HL_FAULT_SLOTS; i++)
    if (!slots[i].used)
      {
        slots[i].used = 1;
        slots[i].dev = st.st_dev;
        slots[i].ino = st.st_ino;
        slots[i].written = 0;
        return &slots[i].written;
      }
  return NULL;
}

ssize_t
write (int fd, const void *buf, size_t count)
{
  static HlWriteFn real_write;
  if (real_write == NULL)
    real_write = (HlWriteFn) dlsym (RTLD_NEXT, "write");

  size_t *used = budget_used (fd);
  if (used == NULL)
    return real_write (fd, buf, count);

  size_t limit = strtoul (getenv ("HL_FAULT_WRITE_AFTER"), NULL, 10);
  if (*used >= limit)
    {
      errno = ENOSPC;
      return -1;
    }
  if (count > limit - *used)
    count = limit - *used;
  ssize_t n = real_write (fd, buf, count);
  if (n > 0)
    *used += (size_t) n;
  return n;
}
