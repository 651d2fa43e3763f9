/* hl-result-fields.c: the one table of result quantities.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "hl-i18n.h"
#include "hl-result-fields.h"

#define PERCENT 100.0

static double get_arm (const HlResult *r) { return r->abductor_arm_mm; }
static double get_bw_arm (const HlResult *r) { return r->bw_arm_mm; }
static double get_ratio (const HlResult *r) { return r->lever_ratio; }
static double get_fa_n (const HlResult *r) { return r->abductor_force_n; }
static double get_fa_bw (const HlResult *r) { return r->abductor_force_bw; }
static double get_j_n (const HlResult *r) { return r->jrf_n; }
static double get_j_bw (const HlResult *r) { return r->jrf_bw; }
static double get_j_angle (const HlResult *r) { return hl_result_jrf_angle_deg (r); }
static double get_demand (const HlResult *r) { return r->demand; }
static double get_demand_pct (const HlResult *r) { return PERCENT * r->demand; }
static double get_femoral (const HlResult *r) { return r->femoral_offset_change_mm; }
static double get_global (const HlResult *r) { return r->global_offset_change_mm; }
static double get_leg (const HlResult *r) { return r->leg_length_change_mm; }
static double get_abd_len (const HlResult *r) { return r->abductor_length_change_mm; }
static double get_j_x (const HlResult *r) { return r->jrf_x_n; }
static double get_j_y (const HlResult *r) { return r->jrf_y_n; }
static double get_m_ext (const HlResult *r) { return r->moment_ext_nmm; }
static double get_unbalanced (const HlResult *r) { return r->unbalanced_nmm; }
static double get_x_s (const HlResult *r) { return r->x_s_mm; }
static double get_acetabular (const HlResult *r) { return r->acetabular_offset_change_mm; }

#define ALL (HL_OUT_WINDOW | HL_OUT_CSV | HL_OUT_TEXT | HL_OUT_REPORT | HL_OUT_SUMMARY)
#define SUMMARY HL_OUT_SUMMARY

static const HlResultField fields[] = {
  { "abductor-moment-arm", N_("Abductor moment arm (mm)"), N_("Abductor moment arm"),
    N_("mm"), HL_DECIMALS_MM, "abductor_arm_mm", 3, "abductor-arm-mm", 1,
    HL_FIELD_PERCENT, ALL, get_arm },
  { "body-weight-moment-arm", N_("Body-weight lever arm (mm)"), N_("Body-weight lever arm"),
    N_("mm"), HL_DECIMALS_MM, "bw_arm_mm", 3, "body-weight-arm-mm", 2,
    HL_FIELD_PERCENT, ALL, get_bw_arm },
  { "lever-ratio", N_("Lever ratio (body weight / abductor)"),
    N_("Lever ratio (weight : abductor)"), "", HL_DECIMALS_RATIO, "lever_ratio", 4,
    "lever-ratio", 3, HL_FIELD_VALUE, ALL, get_ratio },
  { "abductor-force-n", N_("Abductor force (N)"), N_("Abductor force"),
    N_("N"), HL_DECIMALS_N, "abductor_force_N", 3, "abductor-force-n", 4,
    HL_FIELD_PERCENT, ALL, get_fa_n },
  { "abductor-force-bw", N_("Abductor force (x body weight)"), N_("Abductor force"),
    N_("× BW"), HL_DECIMALS_BW, "abductor_force_BW", 3, "abductor-force-bw", 5,
    HL_FIELD_PERCENT, ALL, get_fa_bw },
  { "joint-reaction-force-n", N_("Joint reaction force (N)"), N_("Joint reaction force"),
    N_("N"), HL_DECIMALS_N, "jrf_N", 3, "joint-force-n", 8,
    HL_FIELD_PERCENT, ALL, get_j_n },
  { "joint-reaction-force-bw", N_("Joint reaction force (x body weight)"),
    N_("Joint reaction force"), N_("× BW"), HL_DECIMALS_BW, "jrf_BW", 3,
    "joint-force-bw", 9, HL_FIELD_PERCENT, ALL, get_j_bw },
  { "joint-force-angle", N_("Joint reaction force from vertical (deg)"),
    N_("Joint force angle from vertical"), N_("°"), HL_DECIMALS_DEG, "jrf_angle_deg", 3,
    "joint-force-angle-deg", 10, HL_FIELD_VALUE, ALL, get_j_angle },
  { "capacity-use", N_("Capacity use: demand over capacity (%)"),
    N_("Capacity use"), N_("%"), 0, NULL, 0, NULL, 0,
    HL_FIELD_VALUE, HL_OUT_REPORT, get_demand_pct },
  { "femoral-offset-change", N_("Femoral offset change (mm)"), N_("Femoral offset change"),
    N_("mm"), HL_DECIMALS_MM, NULL, 0, "femoral-offset-change-mm", 16,
    HL_FIELD_CHANGE, HL_OUT_REPORT | SUMMARY, get_femoral },
  { "global-offset-change", N_("Global offset change (mm)"), N_("Global offset change"),
    N_("mm"), HL_DECIMALS_MM, "global_offset_change_mm", 3,
    "global-offset-change-mm", 18, HL_FIELD_CHANGE, ALL, get_global },
  { "leg-length-change", N_("Leg length change (mm)"), N_("Leg length change"),
    N_("mm"), HL_DECIMALS_MM, "leg_length_change_mm", 3, "leg-length-change-mm", 15,
    HL_FIELD_CHANGE, ALL, get_leg },
  { "abductor-length-change", N_("Abductor length change (mm)"), N_("Abductor length change"),
    N_("mm"), HL_DECIMALS_MM, "abductor_length_change_mm", 3,
    "abductor-length-change-mm", 19, HL_FIELD_CHANGE, ALL, get_abd_len },
  { "abductor-demand", N_("Abductor demand over capacity"), N_("Abductor demand"),
    "", HL_DECIMALS_RATIO, NULL, 0, "demand", 14, HL_FIELD_VALUE, HL_OUT_TEXT | SUMMARY,
    get_demand },
  /* In the planning summary only. */
  { "joint-force-x", N_("Joint reaction force, horizontal part (N)"),
    N_("Joint reaction force, horizontal part"), N_("N"), HL_DECIMALS_N, NULL, 0,
    "joint-force-x-n", 6, HL_FIELD_VALUE, SUMMARY, get_j_x },
  { "joint-force-y", N_("Joint reaction force, vertical part (N)"),
    N_("Joint reaction force, vertical part"), N_("N"), HL_DECIMALS_N, NULL, 0,
    "joint-force-y-n", 7, HL_FIELD_VALUE, SUMMARY, get_j_y },
  { "external-moment", N_("External moment about the hip (N mm)"),
    N_("External moment about the hip"), N_("N mm"), 0, NULL, 0,
    "external-moment-nmm", 11, HL_FIELD_VALUE, SUMMARY, get_m_ext },
  { "unbalanced-moment", N_("Unbalanced moment (N mm)"), N_("Unbalanced moment"),
    N_("N mm"), 0, NULL, 0, "unbalanced-moment-nmm", 12, HL_FIELD_VALUE, SUMMARY,
    get_unbalanced },
  { "weight-line", N_("Body-weight line from the hip centre (mm)"),
    N_("Body-weight line from the hip centre"), N_("mm"), HL_DECIMALS_MM, NULL, 0,
    "weight-line-x-mm", 13, HL_FIELD_VALUE, SUMMARY, get_x_s },
  { "acetabular-offset-change", N_("Acetabular offset change (mm)"),
    N_("Acetabular offset change"), N_("mm"), HL_DECIMALS_MM, NULL, 0,
    "acetabular-offset-change-mm", 17, HL_FIELD_CHANGE, SUMMARY, get_acetabular },
};

#define N_FIELDS (sizeof fields / sizeof fields[0])
_Static_assert (N_FIELDS <= HL_RESULT_FIELD_MAX, "room for every field");

const HlResultField *
hl_result_fields (size_t *n)
{
  *n = N_FIELDS;
  return fields;
}

size_t
hl_result_fields_for (HlResultOutput output,
                      const HlResultField *out[HL_RESULT_FIELD_MAX])
{
  size_t n = 0;
  for (size_t i = 0; i < N_FIELDS; i++)
    if (fields[i].outputs & output)
      out[n++] = &fields[i];
  return n;
}

size_t
hl_result_fields_summary (const HlResultField *out[HL_RESULT_FIELD_MAX])
{
  size_t n = 0;
  for (int place = 1; place <= (int) N_FIELDS; place++)
    for (size_t i = 0; i < N_FIELDS; i++)
      if ((fields[i].outputs & HL_OUT_SUMMARY) && fields[i].summary_order == place)
        out[n++] = &fields[i];
  return n;
}
