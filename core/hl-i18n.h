/* hl-i18n.h: private to the core and the programs; marks strings for gettext.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The core uses the C library's libintl (no GLib).  Static tables hold
 * N_()-marked English strings; whoever shows them passes them through _().
 */
#pragma once

#include <libintl.h>

#ifndef _
# define _(s) dgettext (GETTEXT_PACKAGE, (s))
#endif
#ifndef N_
# define N_(s) (s)
#endif
