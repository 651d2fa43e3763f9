/* hiplever.c: the desktop program.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <locale.h>
#include <stdlib.h>
#include <glib/gi18n.h>

#include "hl-application.h"

int
main (int argc, char *argv[])
{
  gint64 start_us = g_get_monotonic_time ();
  g_autoptr(HlApplication) app = NULL;
  int status;

  setlocale (LC_ALL, "");
  /* Uninstalled runs (the tests) use the catalogues built in the build tree. */
  const char *localedir = getenv ("HIPLEVER_LOCALEDIR");
  bindtextdomain (GETTEXT_PACKAGE, localedir != NULL && localedir[0] != '\0' ? localedir
                                                                              : HL_LOCALEDIR);
  bind_textdomain_codeset (GETTEXT_PACKAGE, "UTF-8");
  textdomain (GETTEXT_PACKAGE);

  /* With the cairo renderer asked for, GDK would still load the whole GL
   * stack (about 50 MB resident with Mesa) only to choose a visual. */
  if (g_strcmp0 (g_getenv ("GSK_RENDERER"), "cairo") == 0 && g_getenv ("GDK_DEBUG") == NULL)
    g_setenv ("GDK_DEBUG", "gl-disable", FALSE);

  app = hl_application_new (start_us);
  status = g_application_run (G_APPLICATION (app), argc, argv);
  return status != 0 ? status : hl_application_get_exit_status (app);
}
