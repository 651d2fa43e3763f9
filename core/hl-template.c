/* hl-template.c: implant templates: geometry, readouts, suggestions.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The formulas are templating.md section 2, restated in hl-template.h.
 */
#include "config.h"

#include <glib.h>

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-template.h"

#define DEG (M_PI / 180.0)
#define HL_SAME_MM 1e-6

static inline HlVec2 v_add (HlVec2 a, HlVec2 b) { return (HlVec2) { a.x + b.x, a.y + b.y }; }
static inline HlVec2 v_sub (HlVec2 a, HlVec2 b) { return (HlVec2) { a.x - b.x, a.y - b.y }; }
static inline HlVec2 v_scale (HlVec2 a, double k) { return (HlVec2) { a.x * k, a.y * k }; }
static inline double v_dot (HlVec2 a, HlVec2 b) { return a.x * b.x + a.y * b.y; }

void
hl_template_frame (const HlLandmarks *lm, HlSide side, HlTemplateFrame *f)
{
  memset (f, 0, sizeof *f);
  const double sign = side == HL_SIDE_RIGHT ? -1.0 : 1.0;
  f->lat = (HlVec2) { sign, 0.0 };
  f->up = (HlVec2) { 0.0, 1.0 };
  f->pelvis_lat = f->lat;
  f->pelvis_up = f->up;
  f->has_hip_centre = hl_landmarks_has (lm, HL_LM_HIP_CENTRE);
  f->hip_centre = lm->p[HL_LM_HIP_CENTRE];

  if (hl_landmarks_has (lm, HL_LM_TEARDROP) && hl_landmarks_has (lm, HL_LM_TEARDROP_OTHER))
    {
      /* The inter-teardrop line, pointing from the other side's teardrop
       * towards the operated side's: that is the pelvis's own lateral. */
      HlVec2 d = v_sub (lm->p[HL_LM_TEARDROP], lm->p[HL_LM_TEARDROP_OTHER]);
      double len = hypot (d.x, d.y);
      if (len > HL_TEMPLATE_AXIS_MIN_MM && v_dot (d, f->lat) > 0.0)
        {
          f->pelvis_lat = v_scale (d, 1.0 / len);
          /* up: lat turned by 90 degrees towards +y */
          HlVec2 u = { -f->pelvis_lat.y, f->pelvis_lat.x };
          if (u.y < 0.0)
            u = v_scale (u, -1.0);
          f->pelvis_up = u;
          f->pelvis_turned = true;
        }
    }

  if (hl_landmarks_has (lm, HL_LM_SHAFT_PROXIMAL) && hl_landmarks_has (lm, HL_LM_SHAFT_DISTAL))
    {
      HlVec2 d = v_sub (lm->p[HL_LM_SHAFT_PROXIMAL], lm->p[HL_LM_SHAFT_DISTAL]);
      double len = hypot (d.x, d.y);
      if (len >= HL_TEMPLATE_AXIS_MIN_MM && isfinite (len))
        {
          f->has_axis = true;
          f->axis_p = v_scale (d, 1.0 / len);
          if (f->axis_p.y < 0.0)    /* landmarks swapped: still proximal up */
            f->axis_p = v_scale (f->axis_p, -1.0);
          HlVec2 m = { -f->axis_p.y, f->axis_p.x };
          if (v_dot (m, f->lat) > 0.0)   /* medial is against lat */
            m = v_scale (m, -1.0);
          f->axis_m = m;
          HlVec2 ref;
          if (hl_landmarks_has (lm, HL_LM_LESSER_TROCHANTER))
            ref = lm->p[HL_LM_LESSER_TROCHANTER];
          else
            {
              ref = f->hip_centre;
              f->t_from_hip_centre = true;
            }
          HlVec2 a = lm->p[HL_LM_SHAFT_DISTAL];
          f->t = v_add (a, v_scale (f->axis_p, v_dot (v_sub (ref, a), f->axis_p)));
        }
    }
}

HlStatus
hl_template_derive (const HlTemplateFrame *f, const HlTemplate *t,
                    HlTemplateGeometry *g, HlError *err)
{
  if (!t->on || !t->resolved)
    return hl_error_set (err, HL_ERR_INVALID, "template",
                         _("The template's implants have not been looked up "
                           "in their catalogue"));
  if (!f->has_hip_centre)
    return hl_error_set (err, HL_ERR_INVALID, "landmark hip-centre",
                         _("The template needs the native hip centre: place "
                           "the landmark \"Hip centre\""));
  if (!f->has_axis)
    return hl_error_set (err, HL_ERR_DEGENERATE, "landmark shaft-proximal",
                         _("The stem template is seated along the femoral "
                           "shaft axis: place the landmarks \"Shaft axis, "
                           "proximal\" and \"Shaft axis, distal\" at least "
                           "%.0f mm apart"), HL_TEMPLATE_AXIS_MIN_MM);

  const double ti = t->inclination_deg * DEG;
  const double st = sin (ti), ct = cos (ti);
  const HlVec2 c = { t->cup_x_mm, t->cup_y_mm };
  const HlVec2 n = v_add (v_scale (f->pelvis_lat, st), v_scale (f->pelvis_up, -ct));
  const HlVec2 e = v_add (v_scale (f->pelvis_lat, ct), v_scale (f->pelvis_up, st));
  const double r = 0.5 * t->cup_diameter_mm;

  g->cup_centre = c;
  g->face_normal = n;
  g->rotation_centre = v_add (c, v_scale (n, t->dims.liner_lateralisation_mm));
  g->face_medial = v_sub (c, v_scale (e, r));
  g->face_lateral = v_add (c, v_scale (e, r));

  const double a = t->dims.neck_shaft_angle_deg * DEG;
  g->stem_origin = v_add (f->t, v_scale (f->axis_p, t->seat_mm));
  g->neck_base = v_add (g->stem_origin,
                        v_add (v_scale (f->axis_p, t->dims.neck_height_mm),
                               v_scale (f->axis_m, t->dims.neck_offset_mm)));
  const HlVec2 along = v_sub (v_scale (f->axis_m, sin (a)), v_scale (f->axis_p, cos (a)));
  g->head_centre = v_add (g->neck_base, v_scale (along, t->head_length_mm));

  const HlVec2 c0 = f->hip_centre;
  g->cup_medial_mm = v_dot (v_sub (c0, g->rotation_centre), f->lat);
  g->cup_superior_mm = v_dot (v_sub (g->rotation_centre, c0), f->up);
  g->femoral_offset_mm = v_dot (v_sub (c0, g->head_centre), f->lat);
  g->femoral_length_mm = v_dot (v_sub (g->head_centre, c0), f->up);
  return HL_OK;
}

void
hl_template_geometry_to_recon (const HlTemplateGeometry *g, const HlTemplate *t,
                               HlRecon *recon)
{
  recon->cup_medial_mm = g->cup_medial_mm;
  recon->cup_superior_mm = g->cup_superior_mm;
  recon->femoral_offset_mm = g->femoral_offset_mm;
  recon->femoral_length_mm = g->femoral_length_mm;
  recon->head_length_mm = 0.0;
  if (t->resolved)
    recon->neck_shaft_angle_deg = t->dims.neck_shaft_angle_deg;
}

HlStatus
hl_template_resolve (HlTemplate *t, const HlCatalogue *cat, HlError *err)
{
  t->resolved = false;
  if (cat == NULL || strcmp (cat->id, t->catalogue) != 0)
    return hl_error_set (err, HL_ERR_INVALID, "template catalogue",
                         _("The catalogue \"%s\" is not loaded"), t->catalogue);
  const HlCupFamily *cf = hl_catalogue_cup_family (cat, t->cup_family);
  if (cf == NULL)
    return hl_error_set (err, HL_ERR_INVALID, "template cup-family",
                         _("The catalogue \"%s\" has no cup family \"%s\""),
                         cat->id, t->cup_family);
  if (hl_cup_family_size_index (cf, t->cup_diameter_mm) < 0)
    return hl_error_set (err, HL_ERR_INVALID, "template cup-diameter-mm",
                         _("The cup family \"%s\" has no %g mm cup"),
                         cf->id, t->cup_diameter_mm);
  const HlLiner *ln = hl_cup_family_liner (cf, t->liner);
  if (ln == NULL)
    return hl_error_set (err, HL_ERR_INVALID, "template liner",
                         _("The cup family \"%s\" has no liner \"%s\""),
                         cf->id, t->liner);
  const HlStemFamily *sf = hl_catalogue_stem_family (cat, t->stem_family);
  if (sf == NULL)
    return hl_error_set (err, HL_ERR_INVALID, "template stem-family",
                         _("The catalogue \"%s\" has no stem family \"%s\""),
                         cat->id, t->stem_family);
  long si = hl_stem_family_size_index (sf, t->stem_size);
  if (si < 0)
    return hl_error_set (err, HL_ERR_INVALID, "template stem-size",
                         _("The stem family \"%s\" has no size \"%s\""),
                         sf->id, t->stem_size);
  long vi = hl_stem_family_version_index (sf, t->version);
  if (vi < 0)
    return hl_error_set (err, HL_ERR_INVALID, "template version",
                         _("The stem family \"%s\" has no version \"%s\""),
                         sf->id, t->version);
  if (!hl_catalogue_has_head_length (cat, t->head_length_mm))
    return hl_error_set (err, HL_ERR_INVALID, "template head-length-mm",
                         _("The catalogue \"%s\" has no head of length %+g mm"),
                         cat->id, t->head_length_mm);
  const HlNeck *neck = hl_stem_family_neck (sf, (size_t) si, (size_t) vi);
  t->dims.liner_lateralisation_mm = ln->lateralisation_mm;
  t->dims.neck_offset_mm = neck->offset_mm;
  t->dims.neck_height_mm = neck->height_mm;
  t->dims.neck_shaft_angle_deg = sf->versions[vi].neck_shaft_angle_deg;
  t->resolved = true;
  return HL_OK;
}

static void
copy_id (char dst[HL_IMPLANT_ID_MAX], const char *src)
{
  snprintf (dst, HL_IMPLANT_ID_MAX, "%s", src);
}

HlStatus
hl_template_place_default (const HlPlan *plan, const HlCatalogue *cat,
                           HlTemplate *t, HlError *err)
{
  const HlLandmarks *lm = &plan->landmarks;
  memset (t, 0, sizeof *t);
  if (cat->n_cups == 0 || cat->n_stems == 0 || cat->n_heads == 0)
    return hl_error_set (err, HL_ERR_INVALID, "catalogue",
                         _("The catalogue \"%s\" needs a cup family, a stem "
                           "family and a head family for a template"), cat->id);
  if (!hl_landmarks_has (lm, HL_LM_HIP_CENTRE))
    return hl_error_set (err, HL_ERR_INVALID, "landmark hip-centre",
                         _("Place the hip centre before templating"));
  const HlCupFamily *cf = &cat->cups[0];
  const HlStemFamily *sf = &cat->stems[0];

  t->on = true;
  copy_id (t->catalogue, cat->id);
  copy_id (t->cup_family, cf->id);
  copy_id (t->liner, cf->liners[0].id);
  copy_id (t->stem_family, sf->id);
  copy_id (t->version, sf->versions[0].id);
  copy_id (t->stem_size, sf->sizes[(sf->n_sizes - 1) / 2].size);
  t->inclination_deg = HL_CUP_INCLINATION_TARGET_DEG;
  t->cup_x_mm = lm->p[HL_LM_HIP_CENTRE].x;
  t->cup_y_mm = lm->p[HL_LM_HIP_CENTRE].y;

  /* Cup: the size whose radius reaches from the centre to the teardrop,
   * else the middle size. */
  double want = NAN;
  if (hl_landmarks_has (lm, HL_LM_TEARDROP))
    want = 2.0 * hypot (lm->p[HL_LM_TEARDROP].x - t->cup_x_mm,
                        lm->p[HL_LM_TEARDROP].y - t->cup_y_mm);
  size_t best = (cf->n_sizes - 1) / 2;
  if (isfinite (want))
    for (size_t i = 0; i < cf->n_sizes; i++)
      if (fabs (cf->diameters_mm[i] - want) < fabs (cf->diameters_mm[best] - want))
        best = i;
  t->cup_diameter_mm = cf->diameters_mm[best];

  /* Head: the length nearest 0. */
  double lengths[64];
  size_t nl = hl_catalogue_head_lengths (cat, lengths, 64);
  if (nl > 64)
    nl = 64;
  double h = lengths[0];
  for (size_t i = 1; i < nl; i++)
    if (fabs (lengths[i]) < fabs (h))
      h = lengths[i];
  t->head_length_mm = h;

  HlStatus st = hl_template_resolve (t, cat, err);
  if (st != HL_OK)
    return st;

  /* Where the acetabulum is marked, start from the size the cup suggestion
   * gives (teardrop to lateral margin): the teardrop distance alone is a
   * radius only for a cup already seated at the teardrop, and overshoots
   * from the native centre. */
  HlCupSuggestion cup;
  if (hl_template_suggest_cup (plan, t, cat, &cup, NULL) == HL_OK
      && hl_cup_family_size_index (cf, cup.diameter_mm) >= 0)
    t->cup_diameter_mm = cup.diameter_mm;

  /* Seat: the head centre level with the rotation centre. */
  HlTemplateFrame f;
  HlTemplateGeometry g;
  hl_template_frame (lm, plan->side, &f);
  t->seat_mm = 0.0;
  if (f.has_axis && hl_template_derive (&f, t, &g, NULL) == HL_OK)
    {
      double s = (g.rotation_centre.y - g.head_centre.y) / f.axis_p.y;
      if (isfinite (s) && fabs (s) <= HL_TEMPLATE_SEAT_MAX_MM)
        t->seat_mm = round (s * 10.0) / 10.0;
    }
  return HL_OK;
}

HlStatus
hl_plan_sync_templates (HlPlan *plan, HlError *err)
{
  HlTemplateFrame f;
  HlStatus first = HL_OK;

  hl_template_frame (&plan->landmarks, plan->side, &f);
  for (size_t i = 0; i < plan->n_options; i++)
    {
      HlRecon *rc = &plan->options[i].recon;
      HlTemplateGeometry g;
      if (!rc->tmpl.on || !rc->tmpl.resolved)
        continue;
      HlStatus st = hl_template_derive (&f, &rc->tmpl, &g, first == HL_OK ? err : NULL);
      if (st != HL_OK)
        {
          if (first == HL_OK)
            first = st;
          continue;
        }
      hl_template_geometry_to_recon (&g, &rc->tmpl, rc);
    }
  return first;
}

const HlCatalogueRef *
hl_plan_catalogue_ref (const HlPlan *plan, const char *id)
{
  for (size_t i = 0; i < plan->n_catalogues && i < HL_PLAN_CATALOGUES_MAX; i++)
    if (strcmp (plan->catalogues[i].id, id) == 0)
      return &plan->catalogues[i];
  return NULL;
}

static void
warn (GString *b, const char *fmt, ...) __attribute__ ((format (printf, 2, 3)));

static void
warn (GString *b, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  g_string_append_vprintf (b, fmt, ap);
  va_end (ap);
  g_string_append_c (b, '\n');
}

size_t
hl_plan_resolve_templates (HlPlan *plan, const HlCatalogueSet *set, char **warnings)
{
  GString *b = g_string_new (NULL);
  size_t unresolved = 0;

  if (warnings != NULL)
    *warnings = NULL;
  for (size_t i = 0; i < plan->n_options; i++)
    {
      HlOption *o = &plan->options[i];
      HlTemplate *t = &o->recon.tmpl;
      if (!t->on)
        continue;
      t->resolved = false;
      const HlCatalogue *cat = set ? hl_catalogue_set_find (set, t->catalogue) : NULL;
      const HlCatalogueRef *ref = hl_plan_catalogue_ref (plan, t->catalogue);
      HlError e;
      hl_error_clear (&e);
      unresolved++;
      if (cat == NULL)
        warn (b, _("Option \"%s\": the implant catalogue \"%s\" is not loaded; "
                    "the option keeps the numbers it was saved with until the "
                    "catalogue is added."), o->name, t->catalogue);
      else if (ref == NULL || strcmp (ref->sha256, cat->sha256) != 0
               || strcmp (ref->version, cat->version) != 0)
        warn (b, _("Option \"%s\": the implant catalogue \"%s\" has changed since "
                    "the plan was saved (version %s, now %s%s); the option keeps "
                    "the numbers it was saved with until its template is applied "
                    "again."), o->name, t->catalogue,
              ref ? ref->version : "?", cat->version,
              ref && strcmp (ref->version, cat->version) == 0
              ? _(", same version but other contents") : "");
      else if (hl_template_resolve (t, cat, &e) != HL_OK)
        warn (b, _("Option \"%s\": %s; the option keeps the numbers it was "
                    "saved with."), o->name, e.message);
      else
        unresolved--;
    }
  /* GLib allocates with the system malloc (since 2.46): the caller frees
   * the text with free(). */
  if (warnings != NULL && b->len > 0)
    *warnings = g_string_free (b, FALSE);
  else
    g_string_free (b, TRUE);
  return unresolved;
}

HlStatus
hl_plan_set_template (HlPlan *plan, size_t index, const HlTemplate *tmpl,
                      const HlCatalogue *cat, HlError *err)
{
  if (index >= plan->n_options)
    return hl_error_set (err, HL_ERR_INVALID, "option",
                         _("There is no option %zu"), index + 1);
  HlOption *o = &plan->options[index];
  HlTemplate t = *tmpl;
  t.on = true;
  HlStatus st = hl_template_check (&t, o->name, err);
  if (st == HL_OK)
    st = hl_template_resolve (&t, cat, err);
  if (st != HL_OK)
    return st;

  HlTemplateFrame f;
  HlTemplateGeometry g;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  if ((st = hl_template_derive (&f, &t, &g, err)) != HL_OK)
    return st;

  /* Record the catalogue (replacing a record of the same id). */
  HlCatalogueRef ref;
  hl_catalogue_ref (cat, &ref);
  size_t k;
  for (k = 0; k < plan->n_catalogues; k++)
    if (strcmp (plan->catalogues[k].id, ref.id) == 0)
      break;
  if (k == plan->n_catalogues)
    {
      if (k >= HL_PLAN_CATALOGUES_MAX)
        return hl_error_set (err, HL_ERR_INVALID, "catalogues",
                             _("A plan can use at most %d implant catalogues"),
                             HL_PLAN_CATALOGUES_MAX);
      plan->n_catalogues++;
    }
  plan->catalogues[k] = ref;

  o->recon.tmpl = t;
  hl_template_geometry_to_recon (&g, &t, &o->recon);
  /* Other options from the same catalogue id now follow this record: they
   * were resolved against the same catalogue or are re-resolved here. */
  for (size_t i = 0; i < plan->n_options; i++)
    {
      HlTemplate *ot = &plan->options[i].recon.tmpl;
      if (i != index && ot->on && strcmp (ot->catalogue, cat->id) == 0)
        if (hl_template_resolve (ot, cat, NULL) == HL_OK
            && hl_template_derive (&f, ot, &g, NULL) == HL_OK)
          hl_template_geometry_to_recon (&g, ot, &plan->options[i].recon);
    }
  return HL_OK;
}

/* ---- Drawing ---------------------------------------------------------- */

static const HlStemSize *
template_stem (const HlTemplate *t, const HlCatalogue *cat)
{
  if (cat == NULL)
    return NULL;
  const HlStemFamily *sf = hl_catalogue_stem_family (cat, t->stem_family);
  if (sf == NULL)
    return NULL;
  long si = hl_stem_family_size_index (sf, t->stem_size);
  return si < 0 ? NULL : &sf->sizes[si];
}

size_t
hl_template_stem_outline (const HlTemplateFrame *f, const HlTemplate *t,
                          const HlCatalogue *cat, HlVec2 *out, size_t max)
{
  HlTemplateGeometry g;
  const HlStemSize *stem = template_stem (t, cat);
  if (stem == NULL || hl_template_derive (f, t, &g, NULL) != HL_OK
      || max < 2 * stem->n_body + 2)
    return 0;
  size_t n = 0;
  /* medial edge from the most proximal level down */
  for (size_t k = stem->n_body; k-- > 0;)
    {
      const HlBodyWidth *b = &stem->body[k];
      HlVec2 c = v_add (g.stem_origin, v_scale (f->axis_p, b->level_mm));
      out[n++] = v_add (c, v_scale (f->axis_m, 0.5 * b->width_mm));
    }
  /* lateral edge back up */
  for (size_t k = 0; k < stem->n_body; k++)
    {
      const HlBodyWidth *b = &stem->body[k];
      HlVec2 c = v_add (g.stem_origin, v_scale (f->axis_p, b->level_mm));
      out[n++] = v_sub (c, v_scale (f->axis_m, 0.5 * b->width_mm));
    }
  out[n++] = v_add (g.stem_origin, v_scale (f->axis_p, t->dims.neck_height_mm));
  out[n++] = g.head_centre;
  return n;
}

/* ---- Readouts --------------------------------------------------------- */

/* Signed distance of p from the inter-teardrop line, + superior; NaN
 * without a teardrop. */
static double
height_above_teardrops (const HlLandmarks *lm, const HlTemplateFrame *f, HlVec2 p)
{
  HlVec2 a;
  if (hl_landmarks_has (lm, HL_LM_TEARDROP))
    a = lm->p[HL_LM_TEARDROP];
  else if (hl_landmarks_has (lm, HL_LM_TEARDROP_OTHER))
    a = lm->p[HL_LM_TEARDROP_OTHER];
  else
    return NAN;
  return v_dot (v_sub (p, a), f->pelvis_up);
}

static void
canal_levels (const HlLandmarks *lm, const HlTemplateFrame *f, HlVec2 origin,
              double width[HL_CANAL_LEVELS], double level[HL_CANAL_LEVELS])
{
  for (int k = 0; k < HL_CANAL_LEVELS; k++)
    {
      HlLandmarkId med = (HlLandmarkId) (HL_LM_CANAL_MEDIAL_1 + 2 * k);
      HlLandmarkId lat = (HlLandmarkId) (HL_LM_CANAL_LATERAL_1 + 2 * k);
      width[k] = level[k] = NAN;
      if (!f->has_axis || !hl_landmarks_has (lm, med) || !hl_landmarks_has (lm, lat))
        continue;
      HlVec2 a = lm->p[med], b = lm->p[lat];
      width[k] = fabs (v_dot (v_sub (a, b), f->axis_m));
      HlVec2 mid = v_scale (v_add (a, b), 0.5);
      level[k] = v_dot (v_sub (mid, origin), f->axis_p);
    }
}

void
hl_template_readouts (const HlPlan *plan, const HlTemplate *t,
                      const HlCatalogue *cat, HlTemplateReadouts *out)
{
  const HlLandmarks *lm = &plan->landmarks;
  HlTemplateFrame f;
  hl_template_frame (lm, plan->side, &f);

  const HlVec2 c = { t->cup_x_mm, t->cup_y_mm };
  const double r = 0.5 * t->cup_diameter_mm;
  const double ti = t->inclination_deg * DEG;
  const HlVec2 e = v_add (v_scale (f.pelvis_lat, cos (ti)), v_scale (f.pelvis_up, sin (ti)));

  out->inclination_deg = t->inclination_deg;

  /* Ilioischial line: through both points, or with one the perpendicular
   * to the inter-teardrop line through it. */
  out->medial_edge_to_ilioischial_mm = NAN;
  bool up = hl_landmarks_has (lm, HL_LM_ILIOISCHIAL_UPPER);
  bool lo = hl_landmarks_has (lm, HL_LM_ILIOISCHIAL_LOWER);
  if (up || lo)
    {
      HlVec2 a = lm->p[up ? HL_LM_ILIOISCHIAL_UPPER : HL_LM_ILIOISCHIAL_LOWER];
      HlVec2 dir = f.pelvis_up;
      if (up && lo)
        {
          HlVec2 d = v_sub (lm->p[HL_LM_ILIOISCHIAL_UPPER], lm->p[HL_LM_ILIOISCHIAL_LOWER]);
          double len = hypot (d.x, d.y);
          if (len > HL_SAME_MM)
            dir = v_scale (d, 1.0 / len);
        }
      HlVec2 nrm = { -dir.y, dir.x };        /* normal to the line */
      if (v_dot (nrm, f.pelvis_lat) < 0.0)   /* pointing laterally */
        nrm = v_scale (nrm, -1.0);
      /* the cup circle's most medial point against that normal */
      out->medial_edge_to_ilioischial_mm = v_dot (v_sub (c, a), nrm) - r;
    }

  out->uncovered_lateral_mm = NAN;
  if (hl_landmarks_has (lm, HL_LM_ACETABULAR_MARGIN))
    {
      HlVec2 lat_end = v_add (c, v_scale (e, r));
      double d = v_dot (v_sub (lat_end, lm->p[HL_LM_ACETABULAR_MARGIN]), f.pelvis_lat);
      out->uncovered_lateral_mm = d > 0.0 ? d : 0.0;
    }

  out->centre_height_mm = height_above_teardrops (lm, &f, c);

  HlVec2 origin = f.has_axis ? v_add (f.t, v_scale (f.axis_p, t->seat_mm)) : f.t;
  canal_levels (lm, &f, origin, out->canal_width_mm, out->canal_level_mm);
  const HlStemSize *stem = template_stem (t, cat);
  for (int k = 0; k < HL_CANAL_LEVELS; k++)
    {
      double w = NAN;
      out->body_width_mm[k] = NAN;
      out->canal_fill_pct[k] = NAN;
      if (stem == NULL || !isfinite (out->canal_level_mm[k]))
        continue;
      if (hl_stem_body_width (stem, out->canal_level_mm[k], &w))
        {
          out->body_width_mm[k] = w;
          if (out->canal_width_mm[k] > HL_SAME_MM)
            out->canal_fill_pct[k] = 100.0 * w / out->canal_width_mm[k];
        }
    }
}

/* ---- Suggestions ------------------------------------------------------ */

HlStatus
hl_template_suggest_cup (const HlPlan *plan, const HlTemplate *t,
                         const HlCatalogue *cat, HlCupSuggestion *out,
                         HlError *err)
{
  const HlLandmarks *lm = &plan->landmarks;
  memset (out, 0, sizeof *out);
  const HlCupFamily *cf = cat ? hl_catalogue_cup_family (cat, t->cup_family) : NULL;
  if (cf == NULL || cf->n_sizes == 0)
    return hl_error_set (err, HL_ERR_INVALID, "template cup-family",
                         _("The cup family \"%s\" is not in a loaded catalogue"),
                         t->cup_family);
  if (!hl_landmarks_has (lm, HL_LM_TEARDROP) || !hl_landmarks_has (lm, HL_LM_ACETABULAR_MARGIN))
    return hl_error_set (err, HL_ERR_INVALID, "landmark acetabular-margin",
                         _("A cup size is suggested from the span between the "
                           "landmarks \"Teardrop\" and \"Acetabular margin\": "
                           "place both"));
  HlTemplateFrame f;
  hl_template_frame (lm, plan->side, &f);
  HlVec2 td = lm->p[HL_LM_TEARDROP], mg = lm->p[HL_LM_ACETABULAR_MARGIN];
  const double span = hypot (mg.x - td.x, mg.y - td.y);
  const double step = cf->n_sizes > 1
    ? (cf->diameters_mm[cf->n_sizes - 1] - cf->diameters_mm[0]) / (double) (cf->n_sizes - 1)
    : 0.0;
  long best = -1;
  for (size_t i = 0; i < cf->n_sizes; i++)
    if (cf->diameters_mm[i] <= span + 0.5 * step + HL_SAME_MM)
      best = (long) i;
  if (best < 0)
    return hl_error_set (err, HL_ERR_NOT_REACHABLE, "template cup-diameter-mm",
                         _("The acetabulum spans %.1f mm from the teardrop to "
                           "the lateral margin: smaller than the smallest cup "
                           "of \"%s\" (%g mm)"), span, cf->id, cf->diameters_mm[0]);
  const double d = cf->diameters_mm[best];
  const double ti = HL_CUP_INCLINATION_TARGET_DEG * DEG;
  const HlVec2 e = v_add (v_scale (f.pelvis_lat, cos (ti)), v_scale (f.pelvis_up, sin (ti)));
  out->diameter_mm = d;
  out->inclination_deg = HL_CUP_INCLINATION_TARGET_DEG;
  out->centre = v_add (td, v_scale (e, 0.5 * d));
  snprintf (out->reason, sizeof out->reason,
            _("%g mm: the acetabulum spans %.1f mm from the teardrop to the "
              "lateral margin, and %g mm is the largest size within half a size "
              "step of that span (inferomedial edge at the teardrop, %.0f "
              "degrees; common practice)"),
            d, span, d, HL_CUP_INCLINATION_TARGET_DEG);
  return HL_OK;
}

HlStatus
hl_template_suggest_stem (const HlPlan *plan, const HlTemplate *t,
                          const HlCatalogue *cat, HlStemSuggestion *out,
                          HlError *err)
{
  const HlLandmarks *lm = &plan->landmarks;
  memset (out, 0, sizeof *out);
  const HlStemFamily *sf = cat ? hl_catalogue_stem_family (cat, t->stem_family) : NULL;
  if (sf == NULL || sf->n_sizes == 0)
    return hl_error_set (err, HL_ERR_INVALID, "template stem-family",
                         _("The stem family \"%s\" is not in a loaded catalogue"),
                         t->stem_family);
  HlTemplateFrame f;
  hl_template_frame (lm, plan->side, &f);
  if (!f.has_axis)
    return hl_error_set (err, HL_ERR_DEGENERATE, "landmark shaft-proximal",
                         _("A stem size is suggested along the femoral shaft "
                           "axis: place the landmarks \"Shaft axis, proximal\" "
                           "and \"Shaft axis, distal\""));
  double width[HL_CANAL_LEVELS], level[HL_CANAL_LEVELS];
  HlVec2 origin = v_add (f.t, v_scale (f.axis_p, t->seat_mm));
  canal_levels (lm, &f, origin, width, level);
  int n_levels = 0;
  for (int k = 0; k < HL_CANAL_LEVELS; k++)
    n_levels += isfinite (width[k]);
  if (n_levels == 0)
    return hl_error_set (err, HL_ERR_INVALID, "landmark canal-medial-1",
                         _("A stem size is suggested from the canal: place the "
                           "medial and lateral canal edges at one level or more"));

  const bool cemented = sf->fixation == HL_FIXATION_CEMENTED;
  const double mantle = cemented ? HL_CEMENT_MANTLE_MM : 0.0;
  long best = -1;
  int best_level = -1;
  for (size_t i = 0; i < sf->n_sizes; i++)
    {
      bool fits = true;
      int touching = -1;
      for (int k = 0; k < HL_CANAL_LEVELS && fits; k++)
        {
          double w;
          if (!isfinite (width[k]) || !hl_stem_body_width (&sf->sizes[i], level[k], &w))
            continue;
          if (w > width[k] - 2.0 * mantle + HL_SAME_MM)
            fits = false;
          else
            touching = k;
        }
      if (fits && touching >= 0)
        {
          best = (long) i;
          best_level = touching;
        }
    }
  if (best < 0 && cemented)
    return hl_error_set (err, HL_ERR_NOT_REACHABLE, "template stem-size",
                         _("No size of the cemented stem \"%s\" fits the canal "
                           "with a %.0f mm cement mantle on each side at the "
                           "marked levels and this seat"), sf->id, mantle);
  if (best < 0)
    return hl_error_set (err, HL_ERR_NOT_REACHABLE, "template stem-size",
                         _("No size of the cementless stem \"%s\" fits the "
                           "canal at the marked levels and this seat"), sf->id);
  copy_id (out->size, sf->sizes[best].size);
  out->mantle_mm = mantle;
  double w = 0.0;
  hl_stem_body_width (&sf->sizes[best], level[best_level], &w);
  if (cemented)
    snprintf (out->reason, sizeof out->reason,
              _("Size %s: the largest cemented stem whose body (%.1f mm at "
                "canal level %d) leaves a %.0f mm cement mantle on each side "
                "of the %.1f mm canal (mantle: common practice)"),
              out->size, w, best_level + 1, mantle, width[best_level]);
  else
    snprintf (out->reason, sizeof out->reason,
              _("Size %s: the largest cementless stem whose body (%.1f mm at "
                "canal level %d) fits the %.1f mm canal at every marked level"),
              out->size, w, best_level + 1, width[best_level]);
  return HL_OK;
}
