/* hl-template-shape.c: the drawing data of a template, dragging, registry.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-template-shape.h"

#define DEG (M_PI / 180.0)

static inline HlVec2 v_add (HlVec2 a, HlVec2 b) { return (HlVec2) { a.x + b.x, a.y + b.y }; }
static inline HlVec2 v_sub (HlVec2 a, HlVec2 b) { return (HlVec2) { a.x - b.x, a.y - b.y }; }
static inline HlVec2 v_scale (HlVec2 a, double k) { return (HlVec2) { a.x * k, a.y * k }; }
static inline double v_dot (HlVec2 a, HlVec2 b) { return a.x * b.x + a.y * b.y; }

/* ---- The registry ------------------------------------------------------ */

static GMutex registry_lock;
static GPtrArray *registry;   /* HlCatalogue *, in the order registered */

static void
registry_ensure_locked (void)
{
  if (registry != NULL)
    return;
  registry = g_ptr_array_new ();
  HlCatalogue *demo = NULL;
  if (hl_catalogue_load_demo (&demo, NULL) == HL_OK)
    g_ptr_array_add (registry, demo);
}

const HlCatalogue *
hl_catalogue_registry_find (const char *id)
{
  const HlCatalogue *found = NULL;
  if (id == NULL)
    return NULL;
  g_mutex_lock (&registry_lock);
  registry_ensure_locked ();
  for (guint i = registry->len; i-- > 0;)
    {
      const HlCatalogue *c = g_ptr_array_index (registry, i);
      if (strcmp (c->id, id) == 0)
        {
          found = c;
          break;
        }
    }
  g_mutex_unlock (&registry_lock);
  return found;
}

void
hl_catalogue_registry_add (HlCatalogue *cat)
{
  if (cat == NULL)
    return;
  g_mutex_lock (&registry_lock);
  registry_ensure_locked ();
  g_ptr_array_add (registry, cat);
  g_mutex_unlock (&registry_lock);
}

size_t
hl_catalogue_registry_list (const HlCatalogue **out, size_t max)
{
  size_t n = 0;
  g_mutex_lock (&registry_lock);
  registry_ensure_locked ();
  for (guint i = 0; i < registry->len; i++)
    {
      const HlCatalogue *c = g_ptr_array_index (registry, i);
      bool superseded = false;
      for (guint j = i + 1; j < registry->len && !superseded; j++)
        superseded = strcmp (((const HlCatalogue *) g_ptr_array_index (registry, j))->id,
                             c->id) == 0;
      if (superseded)
        continue;
      if (n < max)
        out[n] = c;
      n++;
    }
  g_mutex_unlock (&registry_lock);
  return n;
}

size_t
hl_catalogue_registry_resolve (HlPlan *plan, char **warnings)
{
  const HlCatalogue *list[64];
  size_t n = hl_catalogue_registry_list (list, G_N_ELEMENTS (list));
  if (n > G_N_ELEMENTS (list))
    n = G_N_ELEMENTS (list);
  /* A set that borrows the registry's catalogues: never freed with
   * hl_catalogue_set_free. */
  HlCatalogueSet set = { .items = (HlCatalogue **) list, .n = n, .capacity = n };
  char *text = NULL;
  size_t left = hl_plan_resolve_templates (plan, &set, &text);
  if (warnings != NULL)
    *warnings = text != NULL ? g_strdup (text) : NULL;
  free (text);
  return left;
}

/* ---- The shape --------------------------------------------------------- */

static double
head_radius (const HlCatalogue *cat, double length_mm)
{
  for (size_t i = 0; i < cat->n_heads; i++)
    for (size_t k = 0; k < cat->heads[i].n_lengths; k++)
      if (fabs (cat->heads[i].lengths_mm[k] - length_mm) < 1e-6)
        return 0.5 * cat->heads[i].diameter_mm;
  return cat->n_heads > 0 ? 0.5 * cat->heads[0].diameter_mm : 14.0;
}

bool
hl_template_shape (const HlPlan *plan, size_t index, const HlCatalogue *cat,
                   HlTemplateShape *out)
{
  memset (out, 0, sizeof *out);
  if (plan == NULL || index >= plan->n_options)
    return false;
  const HlTemplate *t = &plan->options[index].recon.tmpl;
  if (!t->on)
    return false;
  if (!t->resolved)
    {
      snprintf (out->message, sizeof out->message,
                _("The template of %s is not drawn: its catalogue %s is missing or "
                  "has changed."), plan->options[index].name, t->catalogue);
      return false;
    }
  if (cat == NULL)
    cat = hl_catalogue_registry_find (t->catalogue);

  HlTemplateFrame f;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  HlTemplateGeometry g;
  HlError err;
  hl_error_clear (&err);
  if (hl_template_derive (&f, t, &g, &err) != HL_OK)
    {
      snprintf (out->message, sizeof out->message, "%s", err.message);
      return false;
    }

  out->cup = true;
  out->cup_centre = g.cup_centre;
  out->cup_radius_mm = 0.5 * t->cup_diameter_mm;
  out->rotation_centre = g.rotation_centre;
  out->face_medial = g.face_medial;
  out->face_lateral = g.face_lateral;
  out->face_normal = g.face_normal;
  /* The dome: the half circle on the side opposite n, from one face end
   * to the other. */
  HlVec2 e = v_sub (g.face_lateral, g.cup_centre);
  double a0 = atan2 (e.y, e.x);
  double an = atan2 (-g.face_normal.y, -g.face_normal.x);
  double d = remainder (an - a0, 2.0 * M_PI);
  if (d >= 0.0)
    {
      out->dome_start_rad = a0;
      out->dome_end_rad = a0 + M_PI;
    }
  else
    {
      out->dome_start_rad = a0 - M_PI;
      out->dome_end_rad = a0;
    }
  double el = hypot (e.x, e.y);
  HlVec2 eu = el > 0.0 ? v_scale (e, 1.0 / el) : (HlVec2) { 1.0, 0.0 };
  out->inclination_handle
    = v_add (g.face_lateral, v_scale (eu, HL_TEMPLATE_INCLINATION_HANDLE_MM));

  if (cat == NULL)
    {
      snprintf (out->message, sizeof out->message,
                _("The stem of %s is not drawn: catalogue %s is not loaded."),
                plan->options[index].name, t->catalogue);
      return true;
    }
  HlVec2 pts[HL_TEMPLATE_SHAPE_MAX_POINTS + 2];
  size_t n = hl_template_stem_outline (&f, t, cat, pts, G_N_ELEMENTS (pts));
  if (n < 4)
    return true;
  out->stem = true;
  out->n_body = n - 2;
  memcpy (out->body, pts, out->n_body * sizeof pts[0]);
  out->neck_base = pts[n - 2];
  out->head_centre = pts[n - 1];
  out->stem_origin = g.stem_origin;
  out->head_radius_mm = head_radius (cat, t->head_length_mm);
  /* The axis along the body: from its most distal to its most proximal
   * level, a little beyond both. */
  double lo = 0.0, hi = 0.0;
  for (size_t i = 0; i < out->n_body; i++)
    {
      double l = v_dot (v_sub (out->body[i], g.stem_origin), f.axis_p);
      lo = i == 0 ? l : fmin (lo, l);
      hi = i == 0 ? l : fmax (hi, l);
    }
  out->axis_distal = v_add (g.stem_origin, v_scale (f.axis_p, lo - 15.0));
  out->axis_proximal = v_add (g.stem_origin, v_scale (f.axis_p, hi + 10.0));
  return true;
}

/* ---- Dragging ---------------------------------------------------------- */

double
hl_template_inclination_towards (const HlPlan *plan, HlVec2 centre, HlVec2 pointer)
{
  HlTemplateFrame f;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  HlVec2 d = v_sub (pointer, centre);
  double x = v_dot (d, f.pelvis_lat), y = v_dot (d, f.pelvis_up);
  if (hypot (x, y) < 1e-9)
    return NAN;
  double t = atan2 (y, x) / DEG;
  /* The face line is a line: a pointer on the medial side gives the same
   * line as its mirror through the centre. */
  if (x < 0.0)
    t = atan2 (-y, -x) / DEG;
  return fmin (fmax (t, HL_TEMPLATE_INCLINATION_MIN_DEG), HL_TEMPLATE_INCLINATION_MAX_DEG);
}

double
hl_template_seat_step (double seat, double mm)
{
  return fmin (fmax (seat + mm, -HL_TEMPLATE_SEAT_MAX_MM), HL_TEMPLATE_SEAT_MAX_MM);
}

double
hl_template_seat_moved (const HlPlan *plan, double seat0, HlVec2 from, HlVec2 to)
{
  HlTemplateFrame f;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  if (!f.has_axis)
    return seat0;
  return hl_template_seat_step (seat0, v_dot (v_sub (to, from), f.axis_p));
}

bool
hl_template_step_cup (HlTemplate *tmpl, const HlCatalogue *cat, int step)
{
  const HlCupFamily *fam = cat != NULL ? hl_catalogue_cup_family (cat, tmpl->cup_family) : NULL;
  if (fam == NULL || fam->n_sizes == 0)
    return false;
  long i = hl_cup_family_size_index (fam, tmpl->cup_diameter_mm);
  long j;
  if (i < 0)
    {
      /* Not a size of the family: the nearest one in the step's direction. */
      j = -1;
      for (size_t k = 0; k < fam->n_sizes; k++)
        if ((step > 0 && fam->diameters_mm[k] > tmpl->cup_diameter_mm && j < 0)
            || (step < 0 && fam->diameters_mm[k] < tmpl->cup_diameter_mm))
          j = (long) k;
    }
  else
    j = i + (step > 0 ? 1 : -1);
  if (j < 0 || (size_t) j >= fam->n_sizes)
    return false;
  tmpl->cup_diameter_mm = fam->diameters_mm[j];
  return true;
}

bool
hl_template_step_stem (HlTemplate *tmpl, const HlCatalogue *cat, int step)
{
  const HlStemFamily *fam = cat != NULL ? hl_catalogue_stem_family (cat, tmpl->stem_family) : NULL;
  if (fam == NULL || fam->n_sizes == 0)
    return false;
  long i = hl_stem_family_size_index (fam, tmpl->stem_size);
  long j = i < 0 ? (step > 0 ? 0 : (long) fam->n_sizes - 1) : i + (step > 0 ? 1 : -1);
  if (j < 0 || (size_t) j >= fam->n_sizes)
    return false;
  g_strlcpy (tmpl->stem_size, fam->sizes[j].size, sizeof tmpl->stem_size);
  return true;
}
