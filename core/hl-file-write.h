/* hl-file-write.h: writing output files without harming what is there.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Every file the programs write (plans, summaries, reports, figures, CSV
 * tables) goes through hl_write_file_atomic:
 *  - only a new name or a regular file is written; a folder, a named pipe,
 *    a device or a socket at the path is refused with a message and left
 *    as it is;
 *  - a symbolic link is followed: its target is written (atomically, in
 *    the target's folder) and the link stays; a link to nothing, or to
 *    something that is not a regular file, is refused;
 *  - the bytes go to a temporary file with a short name (".hl" and six
 *    letters, so any legal file name works) in the same folder, are
 *    flushed and renamed over the file: a failed write leaves the old file
 *    as it was and no temporary file behind;
 *  - an existing file keeps its permission bits, and its owner and group
 *    where the process may set them; a new file gets 0644 less the umask.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The previous version kept by a save with backup: PLAN.hlplan~ */
#define HL_PLAN_BACKUP_SUFFIX "~"

/* Where a save with backup keeps the previous version of path (malloc'd;
 * NULL only when out of memory): path HL_PLAN_BACKUP_SUFFIX, or, when that
 * name would be longer than the folder allows (a name of NAME_MAX bytes),
 * the name cut at a character boundary, "." and 8 hex digits of a hash of
 * the whole name, then the suffix: the same for the same name, different
 * for names that only differ past the cut. */
char *hl_backup_path (const char *path);

/* Checks, without writing, that path may be written as above: HL_OK, or
 * HL_ERR_IO with a message naming what is in the way. */
HlStatus hl_output_path_check (const char *path, HlError *err);

/* True when both paths name one existing file (same device and inode,
 * after following links). */
bool hl_file_same (const char *a, const char *b);

/* Atomically writes `size` bytes to path (temp file, fsync, rename). */
HlStatus hl_write_file_atomic (const char *path, const void *data,
                               size_t size, HlError *err);

/* As hl_write_file_atomic, but once the new bytes are safely in the
 * temporary file and before the rename, an existing regular file at path
 * is kept as hl_backup_path (path) (a hard link, or a copy where the
 * file system has no links), replacing an older backup.  The save stays
 * atomic: when it fails, path is unchanged.  When the backup cannot be
 * made the save is refused (HL_ERR_IO) and path is unchanged too. */
HlStatus hl_write_file_atomic_backup (const char *path, const void *data,
                                      size_t size, HlError *err);

/* The same, streamed: open, write any number of times, then commit (the
 * rename) or abort (the temporary file removed).  Both free f.  A failed
 * write is remembered: the commit then fails too and the old file stays. */
typedef struct HlOutFile HlOutFile;
HlStatus hl_out_file_open (const char *path, bool keep_backup, HlOutFile **out,
                           HlError *err);
HlStatus hl_out_file_write (HlOutFile *f, const void *data, size_t size,
                            HlError *err);
HlStatus hl_out_file_commit (HlOutFile *f, HlError *err);
void hl_out_file_abort (HlOutFile *f);

#ifdef __cplusplus
}
#endif
