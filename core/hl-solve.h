/* hl-solve.h: static frontal-plane equilibrium of single-leg stance.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The free body is the superincumbent body (everything above the stance hip
 * but the stance limb).  External vertical forces act on it: the
 * superincumbent weight W_s = BW (1 - f) at x_s, the cane (upwards, at the
 * hand) and carried loads (downwards, at the hands and on the midline).
 * Their moment about the hip centre is balanced by one resultant abductor
 * force F_a along the unit vector u from origin to insertion, with signed
 * arm r_a = (origin x u)_z:  F_a = -M_ext / r_a.  Muscles only pull: where
 * F_a < 0 the abductors are not needed in that posture, F_a is reported as
 * 0 and the unbalanced moment is given.  The joint reaction force on the
 * pelvis from the femoral head is J = -(sum of all other forces) and acts
 * at the hip centre.
 *
 * Solver frame: origin at the (option's) hip centre, x_lat positive towards
 * the operated side's lateral direction (x_lat = -x for a right hip, +x for
 * a left hip), y superior.
 *
 * Assumptions and limits: rigid segments, a frictionless joint, muscles
 * that only pull, one resultant abductor line, no antagonists, a static
 * frontal-plane posture.  The result is a static estimate, not a
 * measurement.
 */
#pragma once

#include "hl-measure.h"
#include "hl-plan.h"
#include "hl-template.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Geometry limits of model.md section 6. */
#define HL_MIN_ABDUCTOR_ARM_MM     5.0
#define HL_MIN_ABDUCTOR_LENGTH_MM 20.0
/* A virtual origin this far up the set line, used for the abductor length
 * change when the line is set by angle, and for drawing. */
#define HL_VIRTUAL_ORIGIN_MM 100.0

/* Plain-word flags on a result. */
typedef enum {
  HL_FLAG_GLOBAL_OFFSET_REDUCED = 1u << 0,  /* > tol against native or other hip */
  HL_FLAG_LEG_LENGTH            = 1u << 1,  /* |leg length change| > tol */
  HL_FLAG_ABDUCTORS_NOT_NEEDED  = 1u << 2,  /* F_a would be negative */
  HL_FLAG_ABDUCTOR_SLACK        = 1u << 3,  /* shortened beyond tol */
  HL_FLAG_OVER_CAPACITY         = 1u << 4,  /* demand over capacity > 1 */
  HL_FLAG_IMPLAUSIBLE           = 1u << 5,  /* any HlImplausible bit set */
  HL_FLAG_LAST                  = 1u << 5,
} HlFlag;

/* Why a result is flagged "implausible": geometry no adult hip or usual
 * reconstruction has, most often a misplaced landmark or a mistyped option.
 * The limits are deliberately wide; each says where it comes from. */
typedef enum {
  HL_IMPLAUSIBLE_ABDUCTOR_ARM  = 1u << 0,  /* outside the arm limits below */
  HL_IMPLAUSIBLE_TEARDROP      = 1u << 1,  /* hip centre medial to the teardrop */
  HL_IMPLAUSIBLE_CUP_SHIFT     = 1u << 2,  /* cup moved beyond the limit */
  HL_IMPLAUSIBLE_LEG_LENGTH    = 1u << 3,  /* |leg length change| beyond the limit */
  HL_IMPLAUSIBLE_LEVER_RATIO   = 1u << 4,  /* outside the ratio limits */
  HL_IMPLAUSIBLE_JRF_ANGLE     = 1u << 5,  /* joint force beyond the angle limit */
  HL_IMPLAUSIBLE_LAST          = 1u << 5,
} HlImplausible;

/* Abductor moment arm about 30-90 mm: typical adult arms are 50-60 mm
 * (model.md section 2, from memory); the wide limits are common practice. */
#define HL_PLAUSIBLE_ABDUCTOR_ARM_MIN_MM 30.0
#define HL_PLAUSIBLE_ABDUCTOR_ARM_MAX_MM 90.0
/* A cup moved more than 15 mm medially, laterally, up or down: common
 * practice (a reconstruction restores the centre within a few mm). */
#define HL_PLAUSIBLE_CUP_SHIFT_MM 15.0
/* A leg length change beyond 20 mm: common practice. */
#define HL_PLAUSIBLE_LEG_LENGTH_MM 20.0
/* Lever ratio (body-weight lever arm over abductor moment arm) about 1-4:
 * Pauwels 1976 gives about 3, model.md's typical geometry about 2; the
 * limits are common practice. */
#define HL_PLAUSIBLE_LEVER_RATIO_MIN 1.0
#define HL_PLAUSIBLE_LEVER_RATIO_MAX 4.0
/* The joint force about 16 degrees from vertical in single-leg stance
 * (Pauwels, Biomechanics of the Normal and Diseased Hip, Springer 1976);
 * beyond 40 degrees: common practice. */
#define HL_PLAUSIBLE_JRF_ANGLE_DEG 40.0

/* A stable short key ("global-offset-reduced") for CSV and files. */
const char *hl_flag_key (HlFlag flag);
/* Plain words for people. */
const char *hl_flag_text (HlFlag flag);
/* One short line ("Global offset reduced") for a list that shows the full
 * sentence on demand. */
const char *hl_flag_short (HlFlag flag);
/* Writes the keys of `flags` joined by `sep` into buf; returns buf. */
char *hl_flags_format (unsigned flags, const char *sep, char *buf, size_t size);

/* Everything the hot path needs, validated once from a plan. */
typedef struct {
  /* native geometry, solver frame, relative to the native hip centre */
  HlVec2 origin;          /* pelvic; the virtual origin in angle mode */
  HlVec2 insertion;       /* femoral */
  HlVec2 midline;         /* pelvic: the placed midline point */
  double midline_slope;   /* dx/dy of the midline (0 = vertical) */
  bool angle_mode;        /* line set by angle through the insertion */
  HlVec2 u_fixed;         /* unit vector origin -> insertion in angle mode */

  /* forces, N (positive = magnitude) and hand offsets from the midline, mm,
   * along x_lat (negative = medial of the midline) */
  double body_weight_n;
  double inv_body_weight;
  double w_s_n;
  double bw_line_factor;  /* 1 / (1 - f) (segmental) or 1 (midline) */
  double lean_mm;
  double cane_n;
  double cane_dx;
  double load_n[2];       /* indexed by HlHand */
  double load_dx[2];
  double load_midline_n;

  double native_abductor_length_mm;
  double native_abductor_arm_mm;
  double native_femoral_offset_mm;   /* radiographic, NaN when not measured */
  double other_global_offset_mm;     /* NaN when not measured */
  double native_global_offset_mm;    /* NaN when not measured */
  double native_leg_length_difference_mm; /* operated - other, NaN when not measured */
  double capacity_nmm;               /* abductor torque capacity, N mm */
  double capacity_force_n;           /* capacity_nmm over the native arm */
  /* Flag references, derived from the measures above: the global offset
   * drop is go_drop_base - change (the other hip's global offset minus
   * native's where both are measured, else 0), the leg length difference
   * lld_base + change (native's where measured, else 0). */
  double go_drop_base;
  double lld_base;
  HlTolerances tol;
  double teardrop_x;                 /* operated teardrop, solver frame; NaN
                                      * when not placed */
  double side_sign;                  /* -1 right hip, +1 left hip */
  HlVec2 hip_centre;                 /* native, plan frame */
  HlTemplateFrame tframe;            /* for templated options (hl-template.h) */
} HlModel;

/* The answer for one option (or native). */
typedef struct {
  double abductor_arm_mm;     /* |r_a| */
  double bw_arm_mm;           /* |x_s|, horizontal arm of W_s */
  double lever_ratio;         /* bw_arm / abductor_arm */
  double abductor_force_n;    /* >= 0 */
  double abductor_force_bw;
  double jrf_x_n;             /* J on the pelvis, solver frame */
  double jrf_y_n;
  double jrf_n;               /* |J| */
  double jrf_bw;
  double moment_ext_nmm;      /* moment of the external vertical forces */
  double unbalanced_nmm;      /* M_ext left over when the abductors are not needed */
  double x_s_mm;              /* superincumbent weight line, solver frame */
  double demand;              /* F_a over the force capacity (capacity_force_n) */
  /* planning quantities against native */
  double leg_length_change_mm;
  double femoral_offset_change_mm;
  double acetabular_offset_change_mm;
  double global_offset_change_mm;
  double abductor_length_change_mm;
  double cup_height_change_mm;  /* + superior, the option's cup height */
  double teardrop_lateral_mm;   /* operated teardrop lateral of the hip centre
                                 * (negative: medial, as it should be); NaN
                                 * when the teardrop is not placed */
  unsigned flags;             /* HlFlag bits */
  unsigned implausible;       /* HlImplausible bits (HL_FLAG_IMPLAUSIBLE) */
} HlResult;

/* A short line for one HlImplausible bit ("abductor moment arm outside
 * 30-90 mm"). */
const char *hl_implausible_short (HlImplausible why);
/* The full sentence for one bit of res->implausible: the value, the limit,
 * where the limit comes from and what to check.  Returns buf. */
char *hl_implausible_describe (const HlResult *res, HlImplausible why,
                               char *buf, size_t size);
/* Every reason of res->implausible, full sentences joined by `sep`.
 * Returns buf ("" when there is none). */
char *hl_implausible_describe_all (const HlResult *res, const char *sep,
                                   char *buf, size_t size);

/* Validates the plan (hl_plan_check and the native geometry) and fills the
 * model.  Fails with the landmark or field at fault. */
HlStatus hl_model_prepare (HlModel *model, const HlPlan *plan, HlError *err);

/* Solves one reconstruction (NULL = native).  The hot path: no allocation,
 * no string work unless it fails.  A templated recon (recon->tmpl.on and
 * resolved) is solved with the four numbers derived from its template on
 * the model's native landmarks (hl_recon_resolve), not with its stored
 * ones; an unresolved template uses the stored ones. */
HlStatus hl_model_solve (const HlModel *model, const HlRecon *recon,
                         HlResult *res, HlError *err);

/* The numbers a recon is solved with: a copy of recon, with the four
 * numbers derived from a resolved template (head length 0).  Code that
 * varies one of the four numbers of a templated option (inverse answers,
 * sweeps) resolves it first and clears out->tmpl.on in its copy.  Fails
 * only when the template cannot be derived (no shaft axis). */
HlStatus hl_recon_resolve (const HlModel *model, const HlRecon *recon,
                           HlRecon *out, HlError *err);

/* Angle of the joint reaction force from the vertical, degrees, >= 0. */
double hl_result_jrf_angle_deg (const HlResult *res);
/* Plain words for the sense of J: "the femoral head is loaded inferolaterally"
 * (the usual sense) or "... inferomedially". */
const char *hl_result_jrf_sense (const HlResult *res);

/* Effective femoral offset and length changes of a reconstruction with its
 * head length: f_off + h sin a, f_len - h cos a. */
double hl_recon_total_offset (const HlRecon *recon);
double hl_recon_total_length (const HlRecon *recon);

/* Plan-frame landmarks of a reconstruction with the pelvis held still: the
 * femur (and its hip centre) moves.  Unplaced landmarks stay unplaced. */
void hl_recon_landmarks (const HlPlan *plan, const HlRecon *recon,
                         HlLandmarks *out);

/* The radiographic measures (hl_measure) of row `row` of `plan`: 0 native,
 * i the landmarks of option i - 1 (hl_recon_landmarks). */
void hl_row_measures (const HlPlan *plan, size_t row, HlMeasures *out);

/* A force on the free body for drawing, plan frame. */
typedef enum {
  HL_FORCE_WEIGHT = 0,     /* superincumbent weight */
  HL_FORCE_ABDUCTOR,
  HL_FORCE_JOINT,          /* on the pelvis from the femoral head */
  HL_FORCE_CANE,
  HL_FORCE_LOAD_CONTRA,
  HL_FORCE_LOAD_IPSI,
  HL_FORCE_LOAD_MIDLINE,
  HL_FORCE_N
} HlForceKind;

typedef struct {
  HlForceKind kind;
  HlVec2 point;            /* application point, plan frame, mm */
  HlVec2 vector;           /* force, plan frame, N */
  double bw;               /* magnitude in multiples of body weight */
} HlForce;

typedef struct {
  HlForce f[HL_FORCE_N];
  int n;
  HlVec2 abductor_origin;  /* plan frame: the line of action drawn */
  HlVec2 abductor_insertion;
  HlVec2 hip_centre;
  double midline_x_at_hip; /* plan frame x of the midline at hip height */
} HlForceSet;

/* The forces of a solved reconstruction for drawing; `res` from
 * hl_model_solve with the same recon. */
void hl_model_forces (const HlModel *model, const HlPlan *plan,
                      const HlRecon *recon, const HlResult *res,
                      HlForceSet *out);

const char *hl_force_label (HlForceKind kind);

/* The one wording of a refused solve of row `row` (0 native, i option i),
 * for every output (the window, the report, the CLI's text, CSV and XML):
 * the row goes in front of the field, so that `err` reads "option "NAME":
 * landmark abductor-insertion" / "The abductor moment arm is ...". */
void hl_solve_refusal (HlError *err, const HlPlan *plan, size_t row);

/* Solves row `row` (0 native, i option i) of `plan` with its prepared
 * model; a refusal is zeroed and worded by hl_solve_refusal(). */
HlStatus hl_model_solve_row (const HlModel *model, const HlPlan *plan,
                             size_t row, HlResult *res, HlError *err);

/* Solves native and every option of `plan` with its prepared model, each
 * row on its own: results[i], status[i] and errors[i] for row i (0 native;
 * status and errors may be NULL), a refused row zeroed and worded by
 * hl_solve_refusal().  Returns HL_OK or the first refused row's status. */
HlStatus hl_model_solve_rows (const HlModel *model, const HlPlan *plan,
                              HlResult *results, HlStatus *status,
                              HlError *errors);

/* Prepares and solves native and every option, stopping at the first
 * failure (a refused row worded by hl_solve_refusal()).  `results` has
 * room for 1 + plan->n_options; results[0] is native. */
HlStatus hl_plan_solve_all (const HlPlan *plan, HlResult *results,
                            HlError *err);

#ifdef __cplusplus
}
#endif
