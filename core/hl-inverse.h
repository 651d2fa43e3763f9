/* hl-inverse.h: inverse questions on a prepared model (model.md s. 7).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each question varies one unknown over a search range, all else as in
 * the model (and the option), and asks where a goal is met:
 *
 *  OFFSET_FOR_ARM     the option's femoral_offset_mm at which its abductor
 *                     moment arm equals the native arm;
 *  OFFSET_FOR_GLOBAL  the option's femoral_offset_mm at which its global
 *                     offset change is 0 (native), or restores the other
 *                     hip's global offset when both are measured
 *                     (change = other - native global offset);
 *  CANE_FOR_JRF       the smallest cane force, N, in the opposite hand at
 *                     a given distance from the midline (normally the
 *                     plan's cane.distance_mm), replacing the plan's cane,
 *                     that brings the joint load to the target (xBW) or
 *                     below;
 *  LOAD_FOR_JRF       the largest mass, kg, in one hand (at the plan's
 *                     distance for that hand) or on the midline (replacing
 *                     the plan's load there) that keeps the joint load at
 *                     or below the target (xBW);
 *  LEAN_FOR_CAPACITY  the smallest lateral trunk lean, mm towards the
 *                     stance side (replacing the plan's lean), that brings
 *                     abductor demand to capacity (demand <= 1) or below.
 *
 * Method: the range is scanned from its lower end on an even grid for
 * the first change of sign of goal(x), then that bracket is solved by
 * Brent's method (or bisection) to an absolute tolerance of 1e-6 in the
 * unknown.  For the "at or below" questions the answer is the end of the
 * final bracket on the side where the goal is met, so the answer plugged
 * back into the forward solve meets the goal.
 *
 *  - smallest-value questions (cane, lean): a goal already met at the
 *    lower end gives that end with `at_limit` set;
 *  - the largest-load question: the goal must hold with no load (else
 *    HL_ERR_NOT_REACHABLE); a goal that holds over the whole range gives
 *    the upper end with `at_limit` set;
 *  - a goal met nowhere in range gives HL_ERR_NOT_REACHABLE ("not reachable
 *    in range"), with `achieved` the closest approach in the scan.
 *
 * The cane and load searches stop where the abductors are no longer
 * needed: beyond it the single abductor line cannot balance the pelvis
 * (an adductor moment would be needed) and the model's joint load no
 * longer describes the posture.  `upper` (or `lower`) reports the end
 * actually used and `range_limited` says so.
 */
#pragma once

#include <stdbool.h>
#include "hl-root.h"
#include "hl-solve.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  HL_INVERSE_OFFSET_FOR_ARM = 0,
  HL_INVERSE_OFFSET_FOR_GLOBAL,
  HL_INVERSE_CANE_FOR_JRF,
  HL_INVERSE_LOAD_FOR_JRF,
  HL_INVERSE_LEAN_FOR_CAPACITY,
  HL_INVERSE_N
} HlInverseKind;

/* Where a carried load sits. */
typedef enum {
  HL_LOAD_SITE_CONTRALATERAL = HL_HAND_CONTRALATERAL,
  HL_LOAD_SITE_IPSILATERAL = HL_HAND_IPSILATERAL,
  HL_LOAD_SITE_MIDLINE,
  HL_LOAD_SITE_N
} HlLoadSite;

/* Demand at capacity: over 1 the pelvis cannot be held level. */
#define HL_DEMAND_LIMIT 1.0
/* Grid intervals of the bracketing scan.  The goal functions are smooth
 * with at most one turning point in their default ranges, so 40 intervals
 * cannot miss a crossing there (an assumption checked by the tests). */
#define HL_INVERSE_SCAN_STEPS_DEFAULT 40

typedef struct {
  double lower;           /* search range, in the unknown's unit */
  double upper;
  HlRootMethod method;
  double epsabs;          /* in the unknown */
  int max_iter;
  int scan_steps;
} HlInverseSettings;

/* Documented defaults: femoral offset -50 to +50 mm (the range a plan
 * accepts, HL_RECON_LINEAR_MAX_MM); cane 0 to body weight (the range a
 * plan accepts); load 0 to HL_HAND_LOAD_MAX_KG; lean 0 to HL_LEAN_MAX_MM;
 * Brent's method, HL_ROOT_EPSABS_DEFAULT, HL_ROOT_MAX_ITER_DEFAULT. */
void hl_inverse_settings_default (HlInverseKind kind, const HlModel *model,
                                  HlInverseSettings *settings);

typedef struct {
  HlInverseKind kind;
  HlLoadSite site;        /* LOAD_FOR_JRF only */
  HlStatus status;        /* HL_OK, HL_ERR_NOT_REACHABLE, HL_ERR_NOT_CONVERGED */
  double value;           /* the answer (NaN unless status is HL_OK) */
  const char *unit;       /* "mm", "N", "kg" */
  double goal;            /* target: arm mm, global offset change mm, xBW, demand */
  double achieved;        /* the goal quantity at `value` (the closest
                           * approach in the scan when not reachable) */
  double body_weight_n;   /* of the model, for the words */
  double lower;           /* the range searched */
  double upper;
  bool at_limit;          /* met at the lower end (smallest-value questions) or
                           * over the whole range (largest-load question) */
  bool range_limited;     /* the range was cut where abductors stop being needed */
  bool against_other_hip; /* OFFSET_FOR_GLOBAL: the other hip's global offset */
  int iterations;         /* of the root finder */
} HlInverseAnswer;

/* `option` NULL means native for the cane, load and lean questions; the
 * two offset questions need an option.  `settings` NULL means defaults.
 * The return value equals answer->status, or a failure of the model
 * (HL_ERR_INVALID, HL_ERR_DEGENERATE) with err saying why. */
HlStatus hl_inverse_offset_for_arm (const HlModel *model, const HlRecon *option,
                                    const HlInverseSettings *settings,
                                    HlInverseAnswer *answer, HlError *err);
HlStatus hl_inverse_offset_for_global (const HlModel *model, const HlRecon *option,
                                       const HlInverseSettings *settings,
                                       HlInverseAnswer *answer, HlError *err);
HlStatus hl_inverse_cane_for_jrf (const HlModel *model, const HlRecon *option,
                                  double target_bw, double distance_mm,
                                  const HlInverseSettings *settings,
                                  HlInverseAnswer *answer, HlError *err);
HlStatus hl_inverse_load_for_jrf (const HlModel *model, const HlRecon *option,
                                  HlLoadSite site, double target_bw,
                                  const HlInverseSettings *settings,
                                  HlInverseAnswer *answer, HlError *err);
HlStatus hl_inverse_lean_for_capacity (const HlModel *model, const HlRecon *option,
                                       const HlInverseSettings *settings,
                                       HlInverseAnswer *answer, HlError *err);

/* One sentence that goes with every list of answers: they are planning
 * estimates, never advice to the patient. */
const char *hl_inverse_caveat (void);

/* The answer in one plain sentence (English, through gettext) into buf;
 * returns buf. */
char *hl_inverse_answer_format (const HlInverseAnswer *answer, char *buf,
                                size_t size);

#ifdef __cplusplus
}
#endif
