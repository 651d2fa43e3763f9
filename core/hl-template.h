/* hl-template.h: implant templates on the radiograph (templating.md s. 2-3).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * All points are in the plan frame (x to the patient's LEFT, y superior),
 * true mm; angles in degrees.  The template itself (HlTemplate) is part of
 * an option's HlRecon (hl-plan.h).
 *
 * Frames (hl_template_frame):
 *  - solver frame: lat = (+1, 0) for a left hip, (-1, 0) for a right hip
 *    (towards the operated side's lateral), up = (0, 1);
 *  - pelvic frame for the cup: pelvis_lat, pelvis_up are lat and up turned
 *    with the inter-teardrop line when both teardrops are placed, else
 *    equal to lat and up;
 *  - stem frame: axis_p the unit vector along the femoral shaft axis
 *    (landmarks shaft-distal -> shaft-proximal) pointing proximally,
 *    axis_m the unit perpendicular to it pointing medially; T the
 *    projection onto the axis of the operated lesser-trochanter tip, or of
 *    the hip centre when the tip is not placed (t_from_hip_centre).
 *
 * Geometry (hl_template_derive), with t the inclination, l the liner's
 * lateralisation, s the seat, h the head length, a the version's neck-shaft
 * angle, offset/height the neck of the stem size and version:
 *
 *    n   = sin t pelvis_lat - cos t pelvis_up     face normal, out of the cup
 *    C'  = C + l n                               rotation centre
 *    R   = T + s axis_p                          stem origin
 *    H   = R + height axis_p + offset axis_m + h (sin a axis_m - cos a axis_p)
 *    c_med = (C0 - C') . lat     c_sup = (C' - C0) . up
 *    f_off = (C0 - H)  . lat     f_len = (H - C0)  . up
 *
 * C0 the native hip centre.  The face line runs from the medial edge
 * C - D/2 e to the lateral edge C + D/2 e, e = cos t pelvis_lat +
 * sin t pelvis_up; the dome is on the side opposite n.
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>
#include "hl-catalogue.h"
#include "hl-plan.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The classic radiographic target zone, 40 +/- 10 degrees: Lewinnek et al.
 * 1978, J Bone Joint Surg Am 60:217-220 (recalled). */
#define HL_CUP_INCLINATION_TARGET_DEG 40.0
/* Shaft-axis landmarks closer than this give no axis. */
#define HL_TEMPLATE_AXIS_MIN_MM 10.0

typedef struct {
  HlVec2 hip_centre;        /* C0, native */
  HlVec2 lat, up;           /* solver frame axes in the plan frame */
  HlVec2 pelvis_lat, pelvis_up;
  bool pelvis_turned;       /* both teardrops placed */
  bool has_hip_centre;
  bool has_axis;            /* both shaft-axis landmarks placed and apart */
  HlVec2 axis_p, axis_m;    /* unit, proximal and medial */
  HlVec2 t;                 /* T, on the axis */
  bool t_from_hip_centre;   /* no lesser-trochanter tip: T from the hip centre */
} HlTemplateFrame;

/* The frame of a set of native landmarks for the operated side. */
void hl_template_frame (const HlLandmarks *lm, HlSide side,
                        HlTemplateFrame *out);

typedef struct {
  HlVec2 cup_centre;        /* C */
  HlVec2 rotation_centre;   /* C' */
  HlVec2 face_normal;       /* n */
  HlVec2 face_medial;       /* ends of the face line */
  HlVec2 face_lateral;
  HlVec2 stem_origin;       /* R */
  HlVec2 head_centre;       /* H */
  HlVec2 neck_base;         /* H at head length 0 */
  double cup_medial_mm;     /* c_med, + medial */
  double cup_superior_mm;   /* c_sup, + superior */
  double femoral_offset_mm; /* f_off, + lateral */
  double femoral_length_mm; /* f_len, + longer */
} HlTemplateGeometry;

/* Derives the geometry of a RESOLVED template.  Fails (HL_ERR_INVALID)
 * when it is not resolved, and (HL_ERR_DEGENERATE, field "landmark
 * shaft-proximal") with a message naming the two shaft-axis landmarks when
 * there is no axis, or naming the hip centre when it is not placed.  No
 * allocation; a string only on failure. */
HlStatus hl_template_derive (const HlTemplateFrame *frame,
                             const HlTemplate *tmpl,
                             HlTemplateGeometry *out, HlError *err);

/* Writes the derived four numbers into recon (head length 0, neck-shaft
 * angle the version's); leaves recon->tmpl as it is. */
void hl_template_geometry_to_recon (const HlTemplateGeometry *geo,
                                    const HlTemplate *tmpl, HlRecon *recon);

/* Looks the template's implants up in cat and fills tmpl->dims, sets
 * tmpl->resolved.  Fails naming what the catalogue lacks ("The catalogue
 * has no stem size 13 in family ..."); tmpl->resolved is then false. */
HlStatus hl_template_resolve (HlTemplate *tmpl, const HlCatalogue *cat,
                              HlError *err);

/* A first placement of a template from cat on a plan: the cup family,
 * liner, stem family and version first in the catalogue, the cup centre at
 * the native hip centre at HL_CUP_INCLINATION_TARGET_DEG, the cup size
 * nearest 2 x the distance of the centre from the teardrop (else the middle
 * size), the middle stem size, head length 0, and the seat that brings the
 * head centre level with the rotation centre.  Resolved. */
HlStatus hl_template_place_default (const HlPlan *plan, const HlCatalogue *cat,
                                    HlTemplate *out, HlError *err);

/* Refreshes the stored four numbers of every resolved templated option from
 * the plan's landmarks.  Options whose template cannot be derived (no axis)
 * keep their numbers; returns the first failure (the others are tried). */
HlStatus hl_plan_sync_templates (HlPlan *plan, HlError *err);

/* Opening a plan: resolves each templated option against the catalogue of
 * its id in set.  An option is resolved only when the plan records that
 * catalogue (plan->catalogues) with the same version and SHA-256 as the one
 * found; otherwise it stays unresolved (its saved numbers stand) and a
 * warning says why: catalogue missing, or changed (other version or
 * digest), or the implant no longer in it.  *warnings (may be NULL) gets a
 * malloc'd text, one warning per line, or NULL when there is none.
 * Returns the number of options left unresolved. */
size_t hl_plan_resolve_templates (HlPlan *plan, const HlCatalogueSet *set,
                                  char **warnings);
/* Applies a template to option `index` from catalogue cat: resolves it,
 * derives the four numbers and records cat in plan->catalogues (replacing
 * a record of the same id).  This is how the user's choice of a changed
 * catalogue is accepted. */
HlStatus hl_plan_set_template (HlPlan *plan, size_t index,
                               const HlTemplate *tmpl, const HlCatalogue *cat,
                               HlError *err);
/* The record of catalogue `id` in the plan, NULL when none. */
const HlCatalogueRef *hl_plan_catalogue_ref (const HlPlan *plan, const char *id);

/* ---- Drawing data (render/ draws these, never computes) --------------- */

/* The stem outline in the plan frame: the body's medial edge from the most
 * proximal level down, then the lateral edge back up (a closed polygon of
 * 2 x n_body points; the body is centred on the axis), then the neck: the
 * last two points are the neck base (on the axis at `height`) and H.
 * Returns the number of points written (at most max); 0 when the template
 * cannot be derived or the size is not in cat. */
size_t hl_template_stem_outline (const HlTemplateFrame *frame,
                                 const HlTemplate *tmpl,
                                 const HlCatalogue *cat, HlVec2 *out,
                                 size_t max);

/* ---- Readouts and suggestions (templating.md section 3) -------------- */

#define HL_CANAL_LEVELS 3   /* canal-medial-N / canal-lateral-N landmarks */

typedef struct {
  double inclination_deg;              /* t as placed */
  /* Medial cup edge (circle, along pelvis_lat) from the ilioischial line
   * (the two ilioischial landmarks; with one, the perpendicular to the
   * inter-teardrop line through it): + lateral of the line, - beyond it
   * (medial).  NaN without the landmarks. */
  double medial_edge_to_ilioischial_mm;
  /* How far the lateral end of the face line reaches beyond the lateral
   * acetabular margin landmark along pelvis_lat; 0 when covered, NaN
   * without the landmark. */
  double uncovered_lateral_mm;
  /* Cup centre C above the inter-teardrop line (perpendicular distance,
   * + superior); NaN without a teardrop. */
  double centre_height_mm;
  /* Per canal level (both edges placed): the canal's inner width measured
   * perpendicular to the axis, the level along the axis from R (proximal
   * +), the stem body's width there, and the fill = body / canal x 100.
   * NaN where the level is not marked, fill NaN where the body does not
   * reach the level. */
  double canal_width_mm[HL_CANAL_LEVELS];
  double canal_level_mm[HL_CANAL_LEVELS];
  double body_width_mm[HL_CANAL_LEVELS];
  double canal_fill_pct[HL_CANAL_LEVELS];
} HlTemplateReadouts;

/* Readouts of a template on the plan's native landmarks; cat gives the
 * stem body (may be NULL: fills NaN). */
void hl_template_readouts (const HlPlan *plan, const HlTemplate *tmpl,
                           const HlCatalogue *cat, HlTemplateReadouts *out);

#define HL_SUGGESTION_REASON_MAX 320

typedef struct {
  double diameter_mm;       /* the suggested size */
  HlVec2 centre;            /* a centre with the inferomedial edge at the
                             * teardrop at the target inclination */
  double inclination_deg;
  char reason[HL_SUGGESTION_REASON_MAX];  /* plain words, translated */
} HlCupSuggestion;

/* A cup size from the acetabulum: the distance from the operated teardrop
 * to the lateral acetabular margin is the span the face line should fill
 * (common practice); the suggestion is the largest size of the template's
 * cup family not larger than that span plus half a size step.  Needs the
 * teardrop and acetabular-margin landmarks (HL_ERR_INVALID naming them). */
HlStatus hl_template_suggest_cup (const HlPlan *plan, const HlTemplate *tmpl,
                                  const HlCatalogue *cat,
                                  HlCupSuggestion *out, HlError *err);

typedef struct {
  char size[HL_IMPLANT_ID_MAX];
  double mantle_mm;         /* 0 cementless, HL_CEMENT_MANTLE_MM cemented */
  char reason[HL_SUGGESTION_REASON_MAX];
} HlStemSuggestion;

/* A stem size from the canal edges: the largest size of the template's stem
 * family whose body width at every marked canal level (at the template's
 * seat) is at most the canal width (cementless) or the canal width minus
 * 2 x HL_CEMENT_MANTLE_MM (cemented).  Needs the shaft axis and at least
 * one canal level; fails with a message naming what is missing or saying
 * that no size fits. */
HlStatus hl_template_suggest_stem (const HlPlan *plan, const HlTemplate *tmpl,
                                   const HlCatalogue *cat,
                                   HlStemSuggestion *out, HlError *err);

#ifdef __cplusplus
}
#endif
