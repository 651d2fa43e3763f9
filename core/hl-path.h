/* hl-path.h: file names, on GLib.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The one place that decides how a chosen or suggested file name gets its
 * extension, for every "Save" and "Export" of the window.
 */
#pragma once

#ifdef __cplusplus
extern "C" {
#endif

/* `name` (a file name or a path) with `ext` (".pdf") added unless it
 * already ends with it, in any case of ASCII letters; free with g_free. */
char *hl_path_with_extension (const char *name, const char *ext);

/* A file name suggested from a case label: the label (or `fallback` when
 * it is empty) with '/', '\\' and ':' turned into '-', then `suffix`;
 * free with g_free. */
char *hl_path_suggested_name (const char *label, const char *fallback,
                              const char *suffix);

/* An absolute, canonical path for `path` (relative to `base`, or to the
 * working folder when base is NULL): "." and ".." resolved, repeated
 * separators joined, no file system access; free with g_free. */
char *hl_path_canonical (const char *path, const char *base);

#ifdef __cplusplus
}
#endif
