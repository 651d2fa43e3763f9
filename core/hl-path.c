/* hl-path.c: file names, on GLib.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include <glib.h>

#include "hl-path.h"

char *
hl_path_with_extension (const char *name, const char *ext)
{
  size_t n = strlen (name), e = strlen (ext);

  if (n >= e && g_ascii_strcasecmp (name + n - e, ext) == 0)
    return g_strdup (name);
  return g_strconcat (name, ext, NULL);
}

char *
hl_path_suggested_name (const char *label, const char *fallback,
                        const char *suffix)
{
  g_autofree char *safe = g_strdup (label != NULL && label[0] != '\0' ? label : fallback);

  g_strdelimit (safe, "/\\:", '-');
  return g_strconcat (safe, suffix, NULL);
}

char *
hl_path_canonical (const char *path, const char *base)
{
  return g_canonicalize_filename (path, base);
}
