/* hl-version.c
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "hl-i18n.h"
#include "hl-version.h"

const char *
hl_program_version (void)
{
  return PACKAGE_VERSION;
}

const char *
hl_caution_short (void)
{
  return _("Planning aid only: a static frontal-plane estimate, not a measurement "
         "and not a substitute for surgical judgement.");
}

const char *
hl_caution_text (void)
{
  return _("Planning aid only. hiplever gives a static, frontal-plane estimate of "
         "single-leg stance from a simplified model (rigid segments, a "
         "frictionless joint, one resultant abductor line, muscles that only "
         "pull, no antagonists). It is not a measurement of the patient, it "
         "does not replace surgical judgement, and it must not be used as the "
         "sole basis for a clinical decision. Follow local protocols and "
         "licensed clinical practice.");
}
