/* hl-plan.c: plan data, defaults and range checks.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-plan.h"
#include "hl-text.h"

static const HlLandmarkInfo landmark_info[HL_LM_COUNT] = {
  { HL_LM_HIP_CENTRE, "hip-centre", N_("Hip centre"),
    N_("Centre of the operated femoral head: the centre of rotation."),
    HL_SEGMENT_FEMUR, true, false },
  { HL_LM_MIDLINE, "midline", N_("Midline point"),
    N_("A point on the pelvic midline, such as the centre of the pubic symphysis."),
    HL_SEGMENT_PELVIS, true, false },
  { HL_LM_ABDUCTOR_ORIGIN, "abductor-origin", N_("Abductor origin"),
    N_("A representative point of the abductor origin on the outer iliac wing."),
    HL_SEGMENT_PELVIS, false, false },
  { HL_LM_ABDUCTOR_INSERTION, "abductor-insertion", N_("Abductor insertion"),
    N_("The abductor insertion on the tip of the greater trochanter."),
    HL_SEGMENT_FEMUR, true, false },
  { HL_LM_TEARDROP, "teardrop", N_("Teardrop"),
    N_("Lowest point of the teardrop on the operated side."),
    HL_SEGMENT_PELVIS, false, false },
  { HL_LM_TEARDROP_OTHER, "teardrop-other", N_("Teardrop, other side"),
    N_("Lowest point of the teardrop on the other side."),
    HL_SEGMENT_PELVIS, false, true },
  { HL_LM_LESSER_TROCHANTER, "lesser-trochanter", N_("Lesser trochanter"),
    N_("Tip of the lesser trochanter on the operated side."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_LESSER_TROCHANTER_OTHER, "lesser-trochanter-other",
    N_("Lesser trochanter, other side"),
    N_("Tip of the lesser trochanter on the other side."),
    HL_SEGMENT_OTHER_FEMUR, false, true },
  { HL_LM_SHAFT_PROXIMAL, "shaft-proximal", N_("Shaft axis, proximal"),
    N_("A proximal point on the operated femoral shaft axis."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_SHAFT_DISTAL, "shaft-distal", N_("Shaft axis, distal"),
    N_("A distal point on the operated femoral shaft axis."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_SHAFT_PROXIMAL_OTHER, "shaft-proximal-other",
    N_("Shaft axis, proximal, other side"),
    N_("A proximal point on the other femoral shaft axis."),
    HL_SEGMENT_OTHER_FEMUR, false, true },
  { HL_LM_SHAFT_DISTAL_OTHER, "shaft-distal-other",
    N_("Shaft axis, distal, other side"),
    N_("A distal point on the other femoral shaft axis."),
    HL_SEGMENT_OTHER_FEMUR, false, true },
  { HL_LM_HIP_CENTRE_OTHER, "hip-centre-other", N_("Hip centre, other side"),
    N_("Centre of the other femoral head."),
    HL_SEGMENT_OTHER_FEMUR, false, true },
  { HL_LM_ILIOISCHIAL_UPPER, "ilioischial-upper", N_("Ilioischial line, upper"),
    N_("An upper point on the ilioischial line of the operated side, above the acetabulum."),
    HL_SEGMENT_PELVIS, false, false },
  { HL_LM_ILIOISCHIAL_LOWER, "ilioischial-lower", N_("Ilioischial line, lower"),
    N_("A lower point on the ilioischial line of the operated side, near the teardrop."),
    HL_SEGMENT_PELVIS, false, false },
  { HL_LM_ACETABULAR_MARGIN, "acetabular-margin", N_("Acetabular margin"),
    N_("The lateral edge of the acetabular roof on the operated side."),
    HL_SEGMENT_PELVIS, false, false },
  { HL_LM_CANAL_MEDIAL_1, "canal-medial-1", N_("Canal edge, medial, level 1"),
    N_("The inner edge of the medial femoral cortex, at the most proximal level you measure."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_CANAL_LATERAL_1, "canal-lateral-1", N_("Canal edge, lateral, level 1"),
    N_("The inner edge of the lateral femoral cortex, at the same level as the medial level 1 point."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_CANAL_MEDIAL_2, "canal-medial-2", N_("Canal edge, medial, level 2"),
    N_("The inner edge of the medial femoral cortex, at a middle level."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_CANAL_LATERAL_2, "canal-lateral-2", N_("Canal edge, lateral, level 2"),
    N_("The inner edge of the lateral femoral cortex, at the same level as the medial level 2 point."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_CANAL_MEDIAL_3, "canal-medial-3", N_("Canal edge, medial, level 3"),
    N_("The inner edge of the medial femoral cortex, at the most distal level you measure."),
    HL_SEGMENT_FEMUR, false, false },
  { HL_LM_CANAL_LATERAL_3, "canal-lateral-3", N_("Canal edge, lateral, level 3"),
    N_("The inner edge of the lateral femoral cortex, at the same level as the medial level 3 point."),
    HL_SEGMENT_FEMUR, false, false },
};

const HlLandmarkInfo *
hl_landmark_info (HlLandmarkId id)
{
  if ((int) id < 0 || id >= HL_LM_COUNT)
    return NULL;
  return &landmark_info[id];
}

HlLandmarkId
hl_landmark_from_key (const char *key)
{
  for (int i = 0; key != NULL && i < HL_LM_COUNT; i++)
    if (strcmp (landmark_info[i].key, key) == 0)
      return (HlLandmarkId) i;
  return HL_LM_COUNT;
}

/* Stance-limb mass fractions (thigh + shank + foot, fraction of body mass). */
static const HlLimbTableInfo limb_tables[HL_LIMB_N] = {
  { HL_LIMB_DEMPSTER, "dempster-winter", N_("Dempster (Winter's table), 0.161"),
    "Dempster 1955, WADC-TR-55-159, as tabulated by Winter, Biomechanics and "
    "Motor Control of Human Movement: thigh 0.100 + shank 0.0465 + foot 0.0145",
    0.100 + 0.0465 + 0.0145 },
  { HL_LIMB_PLAGENHOEF_MEN, "plagenhoef-men", N_("Plagenhoef et al., men, 0.1668"),
    "Plagenhoef, Evans & Abdelnour 1983, Res Q Exerc Sport 54:169-178: "
    "thigh 0.1050 + shank 0.0475 + foot 0.0143",
    0.1050 + 0.0475 + 0.0143 },
  { HL_LIMB_PLAGENHOEF_WOMEN, "plagenhoef-women",
    N_("Plagenhoef et al., women, 0.1843"),
    "Plagenhoef, Evans & Abdelnour 1983, Res Q Exerc Sport 54:169-178: "
    "thigh 0.1175 + shank 0.0535 + foot 0.0133",
    0.1175 + 0.0535 + 0.0133 },
  { HL_LIMB_DE_LEVA_MEN, "de-leva-men", N_("de Leva, men, 0.1986"),
    "de Leva 1996, J Biomech 29:1223-1230, after Zatsiorsky and Seluyanov: "
    "thigh 0.1416 + shank 0.0433 + foot 0.0137 (checked against a secondary "
    "tabulation of the paper's table, not the paper itself)",
    0.1416 + 0.0433 + 0.0137 },
  { HL_LIMB_DE_LEVA_WOMEN, "de-leva-women", N_("de Leva, women, 0.2088"),
    "de Leva 1996, J Biomech 29:1223-1230, after Zatsiorsky and Seluyanov: "
    "thigh 0.1478 + shank 0.0481 + foot 0.0129 (checked against a secondary "
    "tabulation of the paper's table, not the paper itself)",
    0.1478 + 0.0481 + 0.0129 },
  { HL_LIMB_SIXTH, "one-sixth", N_("One sixth of body weight"),
    "The classroom rule: one leg is a sixth of body weight (common practice)",
    1.0 / 6.0 },
  { HL_LIMB_CUSTOM, "custom", N_("Typed value"),
    "A value typed by the user", NAN },
};

const HlLimbTableInfo *
hl_limb_table_info (HlLimbTable table)
{
  if ((int) table < 0 || table >= HL_LIMB_N)
    return NULL;
  return &limb_tables[table];
}

HlLimbTable
hl_limb_table_from_key (const char *key)
{
  for (int i = 0; key != NULL && i < HL_LIMB_N; i++)
    if (strcmp (limb_tables[i].key, key) == 0)
      return (HlLimbTable) i;
  return HL_LIMB_N;
}

/* Typical hand distances from the midline, from memory; demo defaults only
 * (model.md section 4). */
#define HL_CANE_DISTANCE_DEFAULT_MM 280.0
#define HL_HAND_DISTANCE_DEFAULT_MM 220.0
/* The textbook resultant abductor line (Williams & Lissner tradition):
 * common practice. */
#define HL_ABDUCTOR_ANGLE_DEFAULT_DEG 70.0
#define HL_MASS_DEFAULT_KG 75.0
#define HL_GLOBAL_OFFSET_DROP_DEFAULT_MM 5.0   /* Mahmood et al. 2016 */
#define HL_LEG_LENGTH_TOL_DEFAULT_MM 10.0      /* common practice */
#define HL_ABDUCTOR_SLACK_DEFAULT_MM 5.0       /* our assumption */
/* Young women, isokinetic peak abductor torque at 60 deg/s: Sugimoto et al.
 * 2014, Clin J Sport Med 24:422-428.  An assumption for any one patient:
 * older or arthritic patients sit well below it. */
#define HL_CAPACITY_DEFAULT_NM_PER_KG 1.13

void
hl_recon_init (HlRecon *recon)
{
  memset (recon, 0, sizeof *recon);
  recon->neck_shaft_angle_deg = HL_NECK_SHAFT_ANGLE_DEFAULT;
}

static void
plan_init_defaults (HlPlan *plan)
{
  memset (plan, 0, sizeof *plan);
  snprintf (plan->label, sizeof plan->label, "%s", "New case");
  plan->mass_kg = HL_MASS_DEFAULT_KG;
  plan->side = HL_SIDE_RIGHT;
  plan->model.limb_table = HL_LIMB_DEMPSTER;
  plan->model.limb_fraction_custom = limb_tables[HL_LIMB_DEMPSTER].fraction;
  plan->model.bw_line = HL_BW_LINE_SEGMENTAL;
  plan->model.abductor_line = HL_ABDUCTOR_LINE_AUTO;
  plan->model.abductor_angle_deg = HL_ABDUCTOR_ANGLE_DEFAULT_DEG;
  plan->calibration.method = HL_CAL_ASSUMED;
  plan->calibration.magnification = HL_MAGNIFICATION_ASSUMED;
  plan->calibration.marker_diameter_mm = HL_MARKER_DIAMETER_DEFAULT;
  plan->calibration.known_distance_mm = 100.0;
  plan->cane.enabled = false;
  plan->cane.hand = HL_HAND_CONTRALATERAL;
  plan->cane.unit = HL_FORCE_UNIT_PERCENT_BW;
  plan->cane.value = 15.0;
  plan->cane.distance_mm = HL_CANE_DISTANCE_DEFAULT_MM;
  plan->loads.hand[HL_HAND_CONTRALATERAL].distance_mm = HL_HAND_DISTANCE_DEFAULT_MM;
  plan->loads.hand[HL_HAND_IPSILATERAL].distance_mm = HL_HAND_DISTANCE_DEFAULT_MM;
  plan->tol.global_offset_drop_mm = HL_GLOBAL_OFFSET_DROP_DEFAULT_MM;
  plan->tol.leg_length_mm = HL_LEG_LENGTH_TOL_DEFAULT_MM;
  plan->tol.abductor_slack_mm = HL_ABDUCTOR_SLACK_DEFAULT_MM;
  plan->capacity.torque_nm_per_kg = HL_CAPACITY_DEFAULT_NM_PER_KG;
  hl_mc_settings_init (&plan->uncertainty);
}

HlPlan *
hl_plan_new (void)
{
  HlPlan *plan = malloc (sizeof *plan);
  if (plan == NULL)
    return NULL;
  plan_init_defaults (plan);
  return plan;
}

void
hl_plan_free (HlPlan *plan)
{
  if (plan == NULL)
    return;
  free (plan->options);
  free (plan);
}

HlStatus
hl_plan_assign (HlPlan *dst, const HlPlan *src)
{
  if (dst == src)
    return HL_OK;

  HlOption *options = NULL;
  if (src->n_options > 0)
    {
      options = malloc (src->n_options * sizeof *options);
      if (options == NULL)
        return HL_ERR_NOMEM;
      memcpy (options, src->options, src->n_options * sizeof *options);
    }

  free (dst->options);
  *dst = *src;
  dst->options = options;
  dst->options_capacity = src->n_options;
  return HL_OK;
}

HlPlan *
hl_plan_copy (const HlPlan *plan)
{
  HlPlan *copy = hl_plan_new ();
  if (copy == NULL)
    return NULL;
  if (hl_plan_assign (copy, plan) != HL_OK)
    {
      hl_plan_free (copy);
      return NULL;
    }
  return copy;
}

void
hl_option_set_name (HlOption *option, const char *name)
{
  /* cut at a whole character, never inside one */
  size_t n = hl_utf8_cut (name ? name : "", sizeof option->name - 1);
  memcpy (option->name, name ? name : "", n);
  option->name[n] = '\0';
}

long
hl_plan_add_option (HlPlan *plan, const char *name, const HlRecon *recon)
{
  if (plan->n_options >= HL_PLAN_MAX_OPTIONS)
    return -1;
  if (plan->n_options == plan->options_capacity)
    {
      size_t cap = plan->options_capacity ? plan->options_capacity * 2 : 4;
      HlOption *grown = realloc (plan->options, cap * sizeof *grown);
      if (grown == NULL)
        return -1;
      plan->options = grown;
      plan->options_capacity = cap;
    }

  HlOption *option = &plan->options[plan->n_options];
  hl_option_set_name (option, name);
  if (recon != NULL)
    option->recon = *recon;
  else
    hl_recon_init (&option->recon);
  return (long) plan->n_options++;
}

void
hl_plan_remove_option (HlPlan *plan, size_t index)
{
  if (index >= plan->n_options)
    return;
  memmove (&plan->options[index], &plan->options[index + 1],
           (plan->n_options - index - 1) * sizeof *plan->options);
  plan->n_options--;
}

long
hl_plan_duplicate_option (HlPlan *plan, size_t index)
{
  if (index >= plan->n_options)
    return -1;

  HlOption copy = plan->options[index];
  char name[HL_NAME_MAX];
  for (unsigned k = 1;; k++)
    {
      char suffix[32];
      if (k == 1)
        snprintf (suffix, sizeof suffix, " (copy)");
      else
        snprintf (suffix, sizeof suffix, " (copy %u)", k);
      /* The original name, cut at a whole character to leave room. */
      size_t room = sizeof name - 1 - strlen (suffix);
      snprintf (name, sizeof name, "%.*s%s", (int) hl_utf8_cut (copy.name, room),
                copy.name, suffix);
      bool used = false;
      for (size_t i = 0; i < plan->n_options && !used; i++)
        used = strcmp (plan->options[i].name, name) == 0;
      if (!used || k > HL_PLAN_MAX_OPTIONS)
        break;
    }
  return hl_plan_add_option (plan, name, &copy.recon);
}

void
hl_plan_mirror (HlPlan *plan)
{
  for (int i = 0; i < HL_LM_COUNT; i++)
    plan->landmarks.p[i].x = -plan->landmarks.p[i].x;
  for (int i = 0; i < 3; i++)
    plan->calibration.points[i].x = -plan->calibration.points[i].x;
  /* a template's cup centre is placed like a landmark */
  for (size_t i = 0; i < plan->n_options; i++)
    plan->options[i].recon.tmpl.cup_x_mm = -plan->options[i].recon.tmpl.cup_x_mm;
  plan->side = plan->side == HL_SIDE_RIGHT ? HL_SIDE_LEFT : HL_SIDE_RIGHT;
}

void
hl_plan_set_demo_landmarks (HlPlan *plan)
{
  /* Invented geometry (model.md section 2), right hip, plan frame: the
   * midline at x = 0, the right hip 95 mm to the patient's right (-x). */
  static const struct { HlLandmarkId id; double x, y; } demo[] = {
    { HL_LM_HIP_CENTRE, -95.0, 0.0 },
    { HL_LM_MIDLINE, 0.0, -35.0 },
    { HL_LM_ABDUCTOR_ORIGIN, -115.0, 90.0 },
    { HL_LM_ABDUCTOR_INSERTION, -155.0, -8.0 },
    { HL_LM_TEARDROP, -62.0, -18.0 },
    { HL_LM_TEARDROP_OTHER, 62.0, -18.0 },
    { HL_LM_LESSER_TROCHANTER, -115.0, -58.0 },
    { HL_LM_LESSER_TROCHANTER_OTHER, 114.0, -60.0 },
    { HL_LM_SHAFT_PROXIMAL, -131.0, -80.0 },
    { HL_LM_SHAFT_DISTAL, -123.0, -180.0 },
    { HL_LM_SHAFT_PROXIMAL_OTHER, 132.0, -79.0 },
    { HL_LM_SHAFT_DISTAL_OTHER, 124.0, -179.0 },
    { HL_LM_HIP_CENTRE_OTHER, 96.0, 1.0 },
    /* templating aids, as in data/examples/demo.hlplan */
    { HL_LM_ILIOISCHIAL_UPPER, -58.0, 40.0 },
    { HL_LM_ILIOISCHIAL_LOWER, -60.0, -25.0 },
    { HL_LM_ACETABULAR_MARGIN, -110.0, 14.0 },
    { HL_LM_CANAL_MEDIAL_1, -120.4, -75.0 },
    { HL_LM_CANAL_LATERAL_1, -142.4, -75.0 },
    { HL_LM_CANAL_MEDIAL_2, -120.3, -120.0 },
    { HL_LM_CANAL_LATERAL_2, -135.3, -120.0 },
    { HL_LM_CANAL_MEDIAL_3, -118.1, -160.0 },
    { HL_LM_CANAL_LATERAL_3, -131.1, -160.0 },
  };

  plan->side = HL_SIDE_RIGHT;
  plan->mass_kg = 72.5;
  snprintf (plan->label, sizeof plan->label, "%s", "Demo case A (invented)");
  memset (&plan->landmarks, 0, sizeof plan->landmarks);
  for (size_t i = 0; i < sizeof demo / sizeof demo[0]; i++)
    hl_landmarks_set (&plan->landmarks, demo[i].id, demo[i].x, demo[i].y);
}

double
hl_plan_limb_fraction (const HlPlan *plan)
{
  if (plan->model.limb_table == HL_LIMB_CUSTOM
      || (int) plan->model.limb_table < 0
      || plan->model.limb_table >= HL_LIMB_N)
    return plan->model.limb_fraction_custom;
  return limb_tables[plan->model.limb_table].fraction;
}

double
hl_plan_body_weight (const HlPlan *plan)
{
  return plan->mass_kg * HL_GRAVITY;
}

double
hl_force_to_newtons (double value, HlForceUnit unit, double mass_kg)
{
  switch (unit)
    {
    case HL_FORCE_UNIT_PERCENT_BW:
      return value / 100.0 * mass_kg * HL_GRAVITY;
    case HL_FORCE_UNIT_KG:
      return value * HL_GRAVITY;
    case HL_FORCE_UNIT_N:
    default:
      return value;
    }
}

double
hl_force_from_newtons (double newtons, HlForceUnit unit, double mass_kg)
{
  switch (unit)
    {
    case HL_FORCE_UNIT_PERCENT_BW:
      return newtons / (mass_kg * HL_GRAVITY) * 100.0;
    case HL_FORCE_UNIT_KG:
      return newtons / HL_GRAVITY;
    case HL_FORCE_UNIT_N:
    default:
      return newtons;
    }
}

double
hl_plan_cane_force (const HlPlan *plan)
{
  if (!plan->cane.enabled)
    return 0.0;
  return hl_force_to_newtons (plan->cane.value, plan->cane.unit, plan->mass_kg);
}

const char *
hl_plan_cane_note (const HlPlan *plan)
{
  if (!plan->cane.enabled || plan->cane.hand != HL_HAND_IPSILATERAL)
    return NULL;
  /* Neumann 1998, Phys Ther 78:490-501 (abstract): a cane in the opposite
   * hand cut abductor activity by about 31%; one in the same-side hand
   * changed nothing. */
  return _("The cane is in the hand on the operated side: held in the other "
           "hand it helps the hip more (a cane in the opposite hand lowered "
           "abductor activity by about 31%, one in the same-side hand changed "
           "nothing: Neumann 1998, Phys Ther 78:490-501).");
}

/* ---- Range checks ----------------------------------------------------- */

static inline bool
in_range (double v, double lo, double hi)
{
  return isfinite (v) && v >= lo && v <= hi;
}

/* The message is only built when a value fails: the check runs on every
 * prepare, on the hot path of batch runs. */
static HlStatus
range_error (double v, double lo, double hi, const char *field,
             const char *what, const char *unit, HlError *err)
{
  if (!isfinite (v))
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("%s is not a finite number"), _(what));
  if (unit == NULL || unit[0] == '\0')   /* a ratio: no stray spaces */
    return hl_error_set (err, HL_ERR_INVALID, field,
                         _("%s is %.6g: it must be between %g and %g"), _(what), v, lo, hi);
  return hl_error_set (err, HL_ERR_INVALID, field,
                       _("%s is %.6g %s: it must be between %g and %g %s"),
                       _(what), v, unit, lo, hi, unit);
}

static HlStatus
check_range (double v, double lo, double hi, const char *field,
             const char *what, const char *unit, HlError *err)
{
  if (in_range (v, lo, hi))
    return HL_OK;
  return range_error (v, lo, hi, field, what, unit, err);
}

static HlStatus
check_recon (const HlRecon *r, const char *option_name, HlError *err)
{
  const struct { double v; const char *key; const char *what; } linear[] = {
    { r->cup_medial_mm, "cup-medialisation", N_("cup medialisation") },
    { r->cup_superior_mm, "cup-height", N_("cup height") },
    { r->femoral_offset_mm, "femoral-offset", N_("femoral offset change") },
    { r->femoral_length_mm, "femoral-length", N_("femoral length change") },
    { r->head_length_mm, "head-length", N_("head length change") },
  };
  char field[HL_ERROR_FIELD_MAX];
  char what[160];

  for (size_t i = 0; i < sizeof linear / sizeof linear[0]; i++)
    {
      if (in_range (linear[i].v, -HL_RECON_LINEAR_MAX_MM, HL_RECON_LINEAR_MAX_MM))
        continue;
      snprintf (field, sizeof field, "option \"%s\" %s", option_name, linear[i].key);
      snprintf (what, sizeof what, _("The %s of option \"%s\""), _(linear[i].what),
                option_name);
      return range_error (linear[i].v, -HL_RECON_LINEAR_MAX_MM,
                          HL_RECON_LINEAR_MAX_MM, field, what, "mm", err);
    }

  if (in_range (r->neck_shaft_angle_deg, HL_NECK_SHAFT_MIN_DEG, HL_NECK_SHAFT_MAX_DEG))
    return HL_OK;
  snprintf (field, sizeof field, "option \"%s\" neck-shaft-angle", option_name);
  snprintf (what, sizeof what, _("The neck-shaft angle of option \"%s\""), option_name);
  return range_error (r->neck_shaft_angle_deg, HL_NECK_SHAFT_MIN_DEG,
                      HL_NECK_SHAFT_MAX_DEG, field, what, "deg", err);
}

static bool
finite_in (double v, double lo, double hi)
{
  return isfinite (v) && v >= lo && v <= hi;
}

HlStatus
hl_template_check (const HlTemplate *t, const char *option_name, HlError *err)
{
  char field[HL_ERROR_FIELD_MAX];
  const char *name = option_name ? option_name : "";

  if (!t->on)
    return HL_OK;
  const struct { const char *s; const char *attr; } ids[] = {
    { t->catalogue, "catalogue" }, { t->cup_family, "cup-family" },
    { t->liner, "liner" }, { t->stem_family, "stem-family" },
    { t->stem_size, "stem-size" }, { t->version, "version" },
  };
  for (size_t i = 0; i < sizeof ids / sizeof ids[0]; i++)
    if (ids[i].s[0] == '\0')
      {
        snprintf (field, sizeof field, "option \"%s\" template %s", name, ids[i].attr);
        return hl_error_set (err, HL_ERR_INVALID, field,
                             _("The template of option \"%s\" has no %s"),
                             name, ids[i].attr);
      }
  const struct { double v, lo, hi; const char *attr; } nums[] = {
    { t->cup_diameter_mm, 1.0, 200.0, "cup-diameter-mm" },
    { t->cup_x_mm, -HL_COORD_MAX_MM, HL_COORD_MAX_MM, "cup-x-mm" },
    { t->cup_y_mm, -HL_COORD_MAX_MM, HL_COORD_MAX_MM, "cup-y-mm" },
    { t->inclination_deg, HL_TEMPLATE_INCLINATION_MIN_DEG,
      HL_TEMPLATE_INCLINATION_MAX_DEG, "inclination-deg" },
    { t->seat_mm, -HL_TEMPLATE_SEAT_MAX_MM, HL_TEMPLATE_SEAT_MAX_MM, "seat-mm" },
    { t->head_length_mm, -HL_TEMPLATE_HEAD_MAX_MM, HL_TEMPLATE_HEAD_MAX_MM,
      "head-length-mm" },
  };
  for (size_t i = 0; i < sizeof nums / sizeof nums[0]; i++)
    if (!finite_in (nums[i].v, nums[i].lo, nums[i].hi))
      {
        snprintf (field, sizeof field, "option \"%s\" template %s", name, nums[i].attr);
        return hl_error_set (err, HL_ERR_INVALID, field,
                             _("The template's %s of option \"%s\" is %g; it "
                               "must lie between %g and %g"),
                             nums[i].attr, name, nums[i].v, nums[i].lo, nums[i].hi);
      }
  return HL_OK;
}

/* Fields the checks above look at only when in use: each is checked
 * whenever present, so that nothing out of range is kept and copied. */
static HlStatus
check_unused_fields (const HlPlan *plan, HlError *err)
{
  HlStatus st;
  const HlCalibration *cal = &plan->calibration;
  /* NaN: no custom fraction was ever given. */
  if ((!isnan (plan->model.limb_fraction_custom)
       && (st = check_range (plan->model.limb_fraction_custom, 0.05, 0.35,
                             "model limb-fraction",
                             N_("The custom stance-limb mass fraction"), "", err)))
      || (st = check_range (cal->magnification, HL_MAGNIFICATION_MIN,
                            HL_MAGNIFICATION_MAX, "calibration magnification",
                            N_("The magnification"), "", err))
      || (st = check_range (cal->marker_diameter_mm, HL_MARKER_DIAMETER_MIN_MM,
                            HL_MARKER_DIAMETER_MAX_MM, "calibration marker-diameter",
                            N_("The calibration marker's diameter"), "mm", err))
      || (st = check_range (cal->known_distance_mm, HL_KNOWN_DISTANCE_MIN_MM,
                            HL_KNOWN_DISTANCE_MAX_MM, "calibration known-distance",
                            N_("The known distance of the two-point calibration"),
                            "mm", err))
      || (st = check_range (plan->cane.distance_mm, 0.0, HL_DISTANCE_MAX_MM,
                            "cane distance",
                            N_("The cane hand's distance from the midline"), "mm", err)))
    return st;
  /* A switched-off cane's force: within what any body weight allows. */
  double cane_max = plan->cane.unit == HL_FORCE_UNIT_PERCENT_BW ? 100.0
                    : plan->cane.unit == HL_FORCE_UNIT_KG ? HL_MASS_MAX_KG
                    : HL_MASS_MAX_KG * HL_GRAVITY;
  const char *unit = plan->cane.unit == HL_FORCE_UNIT_PERCENT_BW ? "%BW"
                     : plan->cane.unit == HL_FORCE_UNIT_KG ? "kg" : "N";
  return check_range (plan->cane.value, 0.0, cane_max, "cane force",
                      N_("The cane force"), unit, err);
}

/* At most HL_PLAN_MAX_OPTIONS options, unique names, and names and the
 * label that print as they are stored. */
static HlStatus
check_names (const HlPlan *plan, HlError *err)
{
  char what[96];
  if (plan->n_options > HL_PLAN_MAX_OPTIONS)
    return hl_error_set (err, HL_ERR_INVALID, "options",
                         _("The plan has %zu options; a plan holds at most %d"),
                         plan->n_options, HL_PLAN_MAX_OPTIONS);
  if (hl_text_unsafe (plan->label, what, sizeof what) != NULL)
    return hl_error_set (err, HL_ERR_INVALID, "patient label",
                         _("The case label holds %s; names and labels must be "
                           "one line of plain text"), what);
  for (size_t i = 0; i < plan->n_catalogues && i < HL_PLAN_CATALOGUES_MAX; i++)
    if (hl_text_unsafe (plan->catalogues[i].id, what, sizeof what) != NULL
        || hl_text_unsafe (plan->catalogues[i].version, what, sizeof what) != NULL)
      return hl_error_set (err, HL_ERR_INVALID, "catalogues",
                           _("Catalogue %zu of the plan has a name or version that "
                             "holds %s; names must be one line of plain text"),
                           i + 1, what);
  for (size_t i = 0; i < plan->n_options; i++)
    {
      if (hl_text_unsafe (plan->options[i].name, what, sizeof what) != NULL)
        return hl_error_set (err, HL_ERR_INVALID, "options",
                             _("The name of option %zu holds %s; names and labels "
                               "must be one line of plain text"), i + 1, what);
      const HlTemplate *t = &plan->options[i].recon.tmpl;
      const char *const ids[] = { t->catalogue, t->cup_family, t->liner,
                                  t->stem_family, t->stem_size, t->version };
      for (size_t k = 0; t->on && k < sizeof ids / sizeof ids[0]; k++)
        if (hl_text_unsafe (ids[k], what, sizeof what) != NULL)
          return hl_error_set (err, HL_ERR_INVALID, "options",
                               _("The implant template of option %zu names a "
                                 "catalogue entry that holds %s; names must be one "
                                 "line of plain text"), i + 1, what);
      for (size_t j = 0; j < i; j++)
        if (strcmp (plan->options[i].name, plan->options[j].name) == 0)
          return hl_error_set (err, HL_ERR_INVALID, "options",
                               _("Options %zu and %zu are both named \"%s\"; each "
                                 "option needs its own name"), j + 1, i + 1,
                               plan->options[i].name);
    }
  return HL_OK;
}

HlStatus
hl_plan_check (const HlPlan *plan, HlError *err)
{
  HlStatus st;

  if ((st = check_range (plan->mass_kg, HL_MASS_MIN_KG, HL_MASS_MAX_KG,
                         "patient mass", N_("The body mass"), "kg", err)))
    return st;
  if (plan->side != HL_SIDE_RIGHT && plan->side != HL_SIDE_LEFT)
    return hl_error_set (err, HL_ERR_INVALID, "operated side",
                         _("The operated side must be right or left"));

  if ((int) plan->model.limb_table < 0 || plan->model.limb_table >= HL_LIMB_N)
    return hl_error_set (err, HL_ERR_INVALID, "model limb-table",
                         _("Unknown stance-limb mass table"));
  double f = hl_plan_limb_fraction (plan);
  if ((st = check_range (f, 0.05, 0.35, "model limb-fraction",
                         N_("The stance-limb mass fraction"), "", err)))
    return st;
  if (plan->model.bw_line != HL_BW_LINE_SEGMENTAL
      && plan->model.bw_line != HL_BW_LINE_MIDLINE)
    return hl_error_set (err, HL_ERR_INVALID, "model body-weight-line",
                         _("Unknown body-weight line method"));
  if ((st = check_range (plan->model.abductor_angle_deg, 30.0, 89.0,
                         "model abductor-angle",
                         N_("The abductor line angle"), "deg", err)))
    return st;
  if ((st = check_range (plan->model.lean_mm, HL_LEAN_MIN_MM, HL_LEAN_MAX_MM,
                         "model lean", N_("The lateral trunk lean"), "mm", err)))
    return st;

  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      if (!hl_landmarks_has (&plan->landmarks, (HlLandmarkId) i))
        {
          if (landmark_info[i].required)
            return hl_error_set (err, HL_ERR_INVALID,
                                 landmark_info[i].key,
                                 _("The required landmark \"%s\" is not placed"),
                                 _(landmark_info[i].label));
          continue;
        }
      const HlVec2 p = plan->landmarks.p[i];
      if (in_range (p.x, -HL_COORD_MAX_MM, HL_COORD_MAX_MM)
          && in_range (p.y, -HL_COORD_MAX_MM, HL_COORD_MAX_MM))
        continue;
      char field[HL_ERROR_FIELD_MAX];
      char what[128];
      bool bad_x = !in_range (p.x, -HL_COORD_MAX_MM, HL_COORD_MAX_MM);
      snprintf (field, sizeof field, "landmark %s", landmark_info[i].key);
      if (bad_x)
        snprintf (what, sizeof what, _("The x coordinate of \"%s\""),
                  _(landmark_info[i].label));
      else
        snprintf (what, sizeof what, _("The y coordinate of \"%s\""),
                  _(landmark_info[i].label));
      return range_error (bad_x ? p.x : p.y, -HL_COORD_MAX_MM, HL_COORD_MAX_MM,
                          field, what, "mm", err);
    }

  /* Calibration: a typed factor must be plausible, and so must the
   * magnification of a marker or two-point calibration once all its points
   * are placed (a half-placed one is still being edited). */
  if (plan->calibration.method == HL_CAL_TYPED
      && (st = check_range (plan->calibration.magnification, HL_MAGNIFICATION_MIN,
                            HL_MAGNIFICATION_MAX, "calibration magnification",
                            N_("The typed magnification"), "", err)))
    return st;
  if (hl_calibration_complete (&plan->calibration)
      && (st = hl_calibration_magnification (&plan->calibration, NULL, NULL, err)))
    return st;
  for (int i = 0; i < 3; i++)
    if (!isfinite (plan->calibration.points[i].x) || !isfinite (plan->calibration.points[i].y))
      return hl_error_set (err, HL_ERR_INVALID, "calibration points",
                           _("Calibration point %d is not a finite number"), i + 1);
  if (plan->calibration.n_points < 0 || plan->calibration.n_points > 3)
    return hl_error_set (err, HL_ERR_INVALID, "calibration points",
                         _("A calibration has at most three points"));
  if ((st = hl_radiograph_check (&plan->radiograph, err)))
    return st;

  /* Aids and loads. */
  if (plan->cane.hand != HL_HAND_CONTRALATERAL && plan->cane.hand != HL_HAND_IPSILATERAL)
    return hl_error_set (err, HL_ERR_INVALID, "cane hand",
                         _("The cane hand must be the opposite or the same-side hand"));
  if ((int) plan->cane.unit < HL_FORCE_UNIT_N || plan->cane.unit > HL_FORCE_UNIT_KG)
    return hl_error_set (err, HL_ERR_INVALID, "cane unit",
                         _("Unknown unit for the cane force"));
  if (plan->cane.enabled)
    {
      if (!isfinite (plan->cane.value))
        return hl_error_set (err, HL_ERR_INVALID, "cane force",
                             _("The cane force is not a finite number"));
      if (plan->cane.value < 0.0)
        return hl_error_set (err, HL_ERR_INVALID, "cane force",
                             _("The cane force is negative: a cane can only push up"));
      double cane_n = hl_plan_cane_force (plan);
      if (cane_n > hl_plan_body_weight (plan))
        return hl_error_set (err, HL_ERR_INVALID, "cane force",
                             _("The cane force (%.1f N) is more than the body weight "
                               "(%.1f N)"), cane_n, hl_plan_body_weight (plan));
      if ((st = check_range (plan->cane.distance_mm, 0.0, HL_DISTANCE_MAX_MM,
                             "cane distance",
                             N_("The cane hand's distance from the midline"),
                             "mm", err)))
        return st;
    }
  static const char *const hand_field[2] = { "load contralateral", "load ipsilateral" };
  static const char *const hand_what[2] = {
    N_("The load in the hand opposite the operated hip"),
    N_("The load in the hand on the operated side"),
  };
  for (int h = 0; h < 2; h++)
    {
      if ((st = check_range (plan->loads.hand[h].mass_kg, 0.0, HL_HAND_LOAD_MAX_KG,
                             hand_field[h], hand_what[h], "kg", err)))
        return st;
      if ((st = check_range (plan->loads.hand[h].distance_mm, 0.0,
                             HL_DISTANCE_MAX_MM, hand_field[h],
                             N_("The hand's distance from the midline"), "mm", err)))
        return st;
    }
  if ((st = check_range (plan->loads.midline_kg, 0.0, HL_HAND_LOAD_MAX_KG,
                         "load midline", N_("The load on the midline"), "kg", err)))
    return st;

  /* Tolerances and capacity. */
  if ((st = check_range (plan->tol.global_offset_drop_mm, 0.0, 50.0,
                         "tolerance global-offset",
                         N_("The global offset tolerance"), "mm", err))
      || (st = check_range (plan->tol.leg_length_mm, 0.0, 50.0,
                            "tolerance leg-length",
                            N_("The leg length tolerance"), "mm", err))
      || (st = check_range (plan->tol.abductor_slack_mm, 0.0, 50.0,
                            "tolerance abductor-slack",
                            N_("The abductor slackening tolerance"), "mm", err))
      || (st = check_range (plan->capacity.torque_nm_per_kg, 0.05, 5.0,
                            "capacity torque",
                            N_("The abductor torque capacity"), "N m/kg", err)))
    return st;

  /* Monte Carlo settings (the magnification is the calibration's). */
  const HlMcSettings *mc = &plan->uncertainty;
  if (mc->n_samples < 1 || mc->n_samples > HL_MC_PLAN_SAMPLES_MAX)
    return hl_error_set (err, HL_ERR_INVALID, "uncertainty samples",
                         _("The number of uncertainty samples is %zu: it must "
                           "be between 1 and %d"), mc->n_samples,
                         HL_MC_PLAN_SAMPLES_MAX);
  if ((st = check_range (mc->landmark_sd_mm, 0.0, HL_MC_LANDMARK_SD_MM_MAX,
                         "uncertainty landmark-sd",
                         N_("The landmark placement error (SD)"), "mm", err))
      || (st = check_range (mc->magnification_sd, 0.0, HL_MC_MAGNIFICATION_SD_MAX,
                            "uncertainty magnification-sd",
                            N_("The magnification error (SD)"), "", err))
      || (st = check_range (mc->line_angle_sd_deg, 0.0, HL_MC_LINE_ANGLE_SD_DEG_MAX,
                            "uncertainty angle-sd",
                            N_("The abductor line angle error (SD)"), "deg", err)))
    return st;

  if ((st = check_unused_fields (plan, err)) || (st = check_names (plan, err)))
    return st;
  for (size_t i = 0; i < plan->n_options; i++)
    if ((st = check_recon (&plan->options[i].recon, plan->options[i].name, err))
        || (st = hl_template_check (&plan->options[i].recon.tmpl,
                                    plan->options[i].name, err)))
      return st;

  return HL_OK;
}
