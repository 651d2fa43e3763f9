/* hl-plan-io.c: plan files and planning summaries (XML, libxml2).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Files are written by libxml2's xmlTextWriter into memory and handed to
 * hl-file-write.c as bytes; numbers go through hl_format_number (the
 * shortest text that reads back as the same double, always with a point).
 * The summary takes the <plan> element's bytes from the plan file's text,
 * so that it is byte-for-byte the same in both: the summary's digest can
 * then be checked against either.  Loading goes through hl-xml-load.c.
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <inttypes.h>
#include <limits.h>
#include <locale.h>
#include <math.h>
#include <stdarg.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include <glib.h>
#include <libxml/parser.h>
#include <libxml/tree.h>
#include <libxml/xmlerror.h>
#include <libxml/xmlwriter.h>

#include "hl-i18n.h"
#include "hl-image.h"
#include "hl-measure.h"
#include "hl-plan-io.h"
#include "hl-result-fields.h"
#include "hl-template.h"
#include "hl-text.h"
#include "hl-uncertainty.h"
#include "hl-version.h"
#include "hl-xml-load.h"

/* Generated from data/hiplever-plan.xsd by core/embed-text.py. */
extern const char hl_schema_data[];
extern const size_t hl_schema_data_len;

#define HL_NUMBER_TEXT_MAX 40         /* "%.17g" of any double fits */
#define HL_ISO_DATE_MAX 40
#define HL_QUOTED_VALUE_MAX 40        /* bytes of a bad value quoted in a message */
/* A value quoted with "%.*s": cut at a whole character, line breaks and
 * bidirectional controls shown as '?' (hl-text.h). */
#define HL_QUOTE_BUF (HL_QUOTED_VALUE_MAX + 1)
#define HL_QUOTE(v) \
  INT_MAX, hl_text_quote ((const char *) (v), HL_QUOTED_VALUE_MAX, \
                          (char[HL_QUOTE_BUF]) { 0 }, HL_QUOTE_BUF)

const char *
hl_plan_schema_text (void)
{
  return hl_schema_data;
}

/* ---- Names in the file ------------------------------------------------- */

static const char *const side_names[] = { "right", "left" };
static const char *const bw_line_names[] = { "segmental", "midline" };
static const char *const abductor_line_names[] = { "auto", "angle" };
static const char *const cal_method_names[] = { "assumed", "typed", "marker", "two-point" };
static const char *const hand_names[] = { "contralateral", "ipsilateral" };
static const char *const force_unit_names[] = { "newtons", "percent-bw", "kg" };
/* HlSpacingSource in a plan: HL_SPACING_NONE is a typed spacing. */
static const char *const spacing_source_names[] = {
  "typed", "pixel-spacing", "imager-spacing-ermf", "imager-spacing-default"
};

#define N_NAMES(a) ((int) (sizeof (a) / sizeof (a)[0]))

typedef struct {
  const char *attr;
  const char *const *names;
  int n;
} HlEnumAttr;

static const HlEnumAttr enum_attrs[] = {
  { "operated-side", side_names, N_NAMES (side_names) },
  { "body-weight-line", bw_line_names, N_NAMES (bw_line_names) },
  { "abductor-line", abductor_line_names, N_NAMES (abductor_line_names) },
  { "method", cal_method_names, N_NAMES (cal_method_names) },
  { "hand", hand_names, N_NAMES (hand_names) },
  { "unit", force_unit_names, N_NAMES (force_unit_names) },
  { "spacing-source", spacing_source_names, N_NAMES (spacing_source_names) },
};

/* Every attribute of a plan that holds a number. */
static const char *const number_attrs[] = {
  "x-mm", "y-mm", "mass-kg", "limb-fraction", "abductor-angle-deg", "lean-mm",
  "magnification", "marker-diameter-mm", "known-distance-mm", "value",
  "distance-mm", "global-offset-drop-mm", "leg-length-mm", "abductor-slack-mm",
  "torque-nm-per-kg", "cup-medial-mm", "cup-superior-mm", "femoral-offset-mm",
  "femoral-length-mm", "head-length-mm", "neck-shaft-angle-deg",
  "landmark-sd-mm", "magnification-sd", "angle-sd-deg",
  "pixel-spacing-mm", "origin-x-mm", "origin-y-mm", "brightness", "contrast",
  "opacity", "cup-diameter-mm", "cup-x-mm", "cup-y-mm", "inclination-deg",
  "seat-mm", "window-centre", "window-width",
};

/* ---- Numbers (always with a point: GLib's ASCII conversions) ---------- */

typedef enum {
  HL_NUMBER_OK,
  HL_NUMBER_NOT_A_NUMBER,
  HL_NUMBER_NOT_FINITE,
} HlNumberParse;

static bool
is_xml_space (char c)
{
  return c == ' ' || c == '\t' || c == '\n' || c == '\r';
}

static bool
is_digit (char c)
{
  return c >= '0' && c <= '9';
}

/* Decimal notation only ([+-]digits[.digits][e[+-]digits]): no hex floats,
 * no "nan" or "inf", which g_ascii_strtod alone would accept. */
static HlNumberParse
parse_number (const char *text, double *out)
{
  const char *s = text;
  while (is_xml_space (*s))
    s++;
  const char *start = s;

  if (*s == '+' || *s == '-')
    s++;
  const char *word = s;
  bool digits = false;
  while (is_digit (*s))
    s++, digits = true;
  if (*s == '.')
    {
      s++;
      while (is_digit (*s))
        s++, digits = true;
    }
  if (!digits)
    {
      static const char *const non_finite[] = { "nan", "inf", "infinity" };
      const char *end = word;
      while (*end != '\0' && !is_xml_space (*end))
        end++;
      for (int i = 0; i < N_NAMES (non_finite); i++)
        if ((size_t) (end - word) == strlen (non_finite[i])
            && strncasecmp (word, non_finite[i], (size_t) (end - word)) == 0)
          return HL_NUMBER_NOT_FINITE;
      return HL_NUMBER_NOT_A_NUMBER;
    }
  if (*s == 'e' || *s == 'E')
    {
      s++;
      if (*s == '+' || *s == '-')
        s++;
      if (!is_digit (*s))
        return HL_NUMBER_NOT_A_NUMBER;
      while (is_digit (*s))
        s++;
    }
  const char *end = s;
  while (is_xml_space (*s))
    s++;
  if (*s != '\0')
    return HL_NUMBER_NOT_A_NUMBER;

  char buf[HL_NUMBER_TEXT_MAX * 2];
  size_t len = (size_t) (end - start);
  if (len >= sizeof buf)
    {
      /* Very long decimal text: g_ascii_strtod reads it in place, the trailing
       * blanks are all it would stop at. */
      double v = g_ascii_strtod (start, NULL);
      if (!isfinite (v))
        return HL_NUMBER_NOT_FINITE;
      *out = v;
      return HL_NUMBER_OK;
    }
  memcpy (buf, start, len);
  buf[len] = '\0';
  double v = g_ascii_strtod (buf, NULL);
  if (!isfinite (v))
    return HL_NUMBER_NOT_FINITE;
  *out = v;
  return HL_NUMBER_OK;
}

/* ---- Writing ----------------------------------------------------------- */

/* Every file is written by libxml2's xmlTextWriter into memory (escaping,
 * indentation, the declaration), then handed to hl-file-write.c as bytes
 * (temporary file, fsync, rename, backup, the old file's mode). */
typedef struct {
  xmlTextWriterPtr x;
  HlError *err;
  HlStatus status;   /* the first failure; later writes are skipped */
  const char *base_file;  /* the file written: image paths relative to it */
} HlWriter;

static void
writer_fail (HlWriter *w, HlStatus status, const char *field, const char *what)
{
  if (w->status != HL_OK)
    return;
  w->status = hl_error_set (w->err, status, field, _("Cannot write the plan: %s"), what);
}

/* A libxml2 writer call: a negative result is a failure to write into
 * memory. */
static void
writer_check (HlWriter *w, int rc)
{
  if (rc < 0 && w->status == HL_OK)
    w->status = hl_error_set (w->err, HL_ERR_NOMEM, "",
                              _("Out of memory while writing the plan"));
}

static void
start (HlWriter *w, const char *name)
{
  if (w->status == HL_OK)
    writer_check (w, xmlTextWriterStartElement (w->x, BAD_CAST name));
}

static void
end (HlWriter *w)
{
  if (w->status == HL_OK)
    writer_check (w, xmlTextWriterEndElement (w->x));
}

/* An attribute whose value is ours (a name from a table, a digest). */
static void
put_attr (HlWriter *w, const char *attr, const char *value)
{
  if (w->status == HL_OK)
    writer_check (w, xmlTextWriterWriteAttribute (w->x, BAD_CAST attr, BAD_CAST value));
}

static void
put_bool (HlWriter *w, const char *attr, bool value)
{
  put_attr (w, attr, value ? "true" : "false");
}

/* Element text (escaped by libxml2). */
static void
put_string (HlWriter *w, const char *text)
{
  if (w->status == HL_OK)
    writer_check (w, xmlTextWriterWriteString (w->x, BAD_CAST text));
}

/* True when `s` (at most `size` bytes) is NUL-terminated, valid UTF-8 and
 * holds only characters XML 1.0 allows. */
static const char *
text_problem (const char *s, size_t size)
{
  if (memchr (s, '\0', size) == NULL)
    return N_("the text is not terminated");

  const unsigned char *p = (const unsigned char *) s;
  while (*p != '\0')
    {
      unsigned c = *p;
      unsigned cp;
      int extra;
      if (c < 0x80)
        {
          if (c < 0x20 && c != '\t' && c != '\n' && c != '\r')
            return N_("the text holds a control character");
          p++;
          continue;
        }
      else if ((c & 0xe0) == 0xc0)
        cp = c & 0x1f, extra = 1;
      else if ((c & 0xf0) == 0xe0)
        cp = c & 0x0f, extra = 2;
      else if ((c & 0xf8) == 0xf0)
        cp = c & 0x07, extra = 3;
      else
        return N_("the text is not valid UTF-8");
      p++;
      for (int i = 0; i < extra; i++, p++)
        {
          if ((*p & 0xc0) != 0x80)
            return N_("the text is not valid UTF-8");
          cp = (cp << 6) | (*p & 0x3f);
        }
      static const unsigned min_for_length[4] = { 0, 0x80, 0x800, 0x10000 };
      if (cp < min_for_length[extra] || cp > 0x10ffff
          || (cp >= 0xd800 && cp <= 0xdfff))
        return N_("the text is not valid UTF-8");
      if (cp == 0xfffe || cp == 0xffff)
        return N_("the text holds a character XML does not allow");
    }
  return NULL;
}

/* A text attribute from the plan: checked first, so that nothing is
 * written a reader would refuse. */
static void
put_text_attr (HlWriter *w, const char *attr, const char *s, size_t size,
               const char *field)
{
  if (w->status != HL_OK)
    return;
  const char *problem = text_problem (s, size);
  if (problem != NULL)
    {
      char what[HL_ERROR_MESSAGE_MAX / 2];
      snprintf (what, sizeof what, "%s: %s", field, _(problem));
      writer_fail (w, HL_ERR_INVALID, field, what);
      return;
    }
  put_attr (w, attr, s);
}

/* A number of the plan: finite, at full precision. */
static void
put_number (HlWriter *w, const char *attr, double v, const char *field)
{
  if (w->status != HL_OK)
    return;
  if (!isfinite (v))
    {
      char what[HL_ERROR_MESSAGE_MAX / 2];
      snprintf (what, sizeof what, _("%s is not a finite number"), field);
      writer_fail (w, HL_ERR_INVALID, field, what);
      return;
    }
  char num[HL_NUMBER_TEXT_SIZE];
  put_attr (w, attr, hl_format_number (num, sizeof num, HL_NUMBER_EXACT, v));
}

/* A computed number of the summary: NaN and INF written as xs:double has them. */
static void
put_result_number (HlWriter *w, const char *attr, double v)
{
  char num[HL_NUMBER_TEXT_SIZE];
  put_attr (w, attr, hl_format_number (num, sizeof num, HL_NUMBER_EXACT, v));
}

static void
put_count (HlWriter *w, const char *attr, uint64_t v)
{
  char num[32];
  snprintf (num, sizeof num, "%" PRIu64, v);
  put_attr (w, attr, num);
}

static void
put_enum (HlWriter *w, const char *attr, int value, const char *const *names,
          int n, const char *field)
{
  if (w->status != HL_OK)
    return;
  if (value < 0 || value >= n)
    {
      char what[HL_ERROR_MESSAGE_MAX / 2];
      snprintf (what, sizeof what, _("%s has the unknown value %d"), field, value);
      writer_fail (w, HL_ERR_INVALID, field, what);
      return;
    }
  put_attr (w, attr, names[value]);
}

/* The recorded Monte Carlo settings; the magnification is the calibration's
 * and is not repeated.  hl_plan_check has vetted the numbers. */
static void
write_uncertainty (HlWriter *w, const HlMcSettings *mc)
{
  start (w, "uncertainty");
  put_count (w, "samples", mc->n_samples);
  put_count (w, "seed", mc->seed);
  put_result_number (w, "landmark-sd-mm", mc->landmark_sd_mm);
  put_result_number (w, "magnification-sd", mc->magnification_sd);
  put_result_number (w, "angle-sd-deg", mc->line_angle_sd_deg);
  end (w);
}

/* The reference only, never the pixels; the path relative to the file
 * being written where there is one. */
static void
write_radiograph (HlWriter *w, const HlRadiograph *rg)
{
  if (!rg->present || w->status != HL_OK)
    return;
  char path[HL_IMAGE_PATH_MAX];
  HlStatus st = hl_image_relative_path (w->base_file, rg->path, path, sizeof path, w->err);
  if (st != HL_OK)
    {
      w->status = st;
      return;
    }
  start (w, "radiograph");
  put_text_attr (w, "path", path, sizeof path, "radiograph path");
  if (rg->sha256[0] != '\0')
    put_text_attr (w, "sha256", rg->sha256, sizeof rg->sha256, "radiograph sha256");
  put_number (w, "pixel-spacing-mm", rg->pixel_spacing_mm, "radiograph pixel-spacing");
  put_number (w, "origin-x-mm", rg->origin_mm.x, "radiograph origin");
  put_number (w, "origin-y-mm", rg->origin_mm.y, "radiograph origin");
  put_number (w, "brightness", rg->brightness, "radiograph brightness");
  put_number (w, "contrast", rg->contrast, "radiograph contrast");
  if (rg->window_width != 0.0)
    {
      put_number (w, "window-centre", rg->window_centre, "radiograph window-centre");
      put_number (w, "window-width", rg->window_width, "radiograph window-width");
    }
  if (rg->spacing_source != HL_SPACING_NONE)
    put_enum (w, "spacing-source", (int) rg->spacing_source, spacing_source_names,
              N_NAMES (spacing_source_names), "radiograph spacing-source");
  put_bool (w, "invert", rg->invert);
  put_number (w, "opacity", rg->opacity, "radiograph opacity");
  put_bool (w, "schematic-visible", rg->schematic_visible);
  end (w);
}

/* A templated option is written with the four numbers its template makes
 * on the plan's landmarks now (the stored ones may lag a landmark move);
 * an unresolved template keeps its stored, last derived numbers. */
static const HlOption *
option_as_saved (const HlPlan *plan, size_t i, HlOption *fresh)
{
  const HlOption *o = &plan->options[i];
  if (!o->recon.tmpl.on || !o->recon.tmpl.resolved)
    return o;
  HlTemplateFrame f;
  HlTemplateGeometry g;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  if (hl_template_derive (&f, &o->recon.tmpl, &g, NULL) != HL_OK)
    return o;
  *fresh = *o;
  hl_template_geometry_to_recon (&g, &o->recon.tmpl, &fresh->recon);
  return fresh;
}

static void
write_template (HlWriter *w, const HlTemplate *t, const char *field)
{
  char f[HL_ERROR_FIELD_MAX];
  snprintf (f, sizeof f, "%.80s template", field);
  start (w, "template");
  put_text_attr (w, "catalogue", t->catalogue, sizeof t->catalogue, f);
  put_text_attr (w, "cup-family", t->cup_family, sizeof t->cup_family, f);
  put_number (w, "cup-diameter-mm", t->cup_diameter_mm, f);
  put_number (w, "cup-x-mm", t->cup_x_mm, f);
  put_number (w, "cup-y-mm", t->cup_y_mm, f);
  put_number (w, "inclination-deg", t->inclination_deg, f);
  put_text_attr (w, "liner", t->liner, sizeof t->liner, f);
  put_text_attr (w, "stem-family", t->stem_family, sizeof t->stem_family, f);
  put_text_attr (w, "stem-size", t->stem_size, sizeof t->stem_size, f);
  put_text_attr (w, "version", t->version, sizeof t->version, f);
  put_number (w, "seat-mm", t->seat_mm, f);
  put_number (w, "head-length-mm", t->head_length_mm, f);
  end (w);
}

static void
write_catalogue_refs (HlWriter *w, const HlPlan *plan)
{
  if (plan->n_catalogues == 0)
    return;
  start (w, "catalogues");
  for (size_t i = 0; i < plan->n_catalogues && i < HL_PLAN_CATALOGUES_MAX; i++)
    {
      const HlCatalogueRef *c = &plan->catalogues[i];
      start (w, "catalogue");
      put_text_attr (w, "id", c->id, sizeof c->id, "catalogue");
      put_text_attr (w, "version", c->version, sizeof c->version, "catalogue");
      put_text_attr (w, "sha256", c->sha256, sizeof c->sha256, "catalogue");
      end (w);
    }
  end (w);
}

static void
write_plan_element (HlWriter *w, const HlPlan *plan)
{
  start (w, "plan");
  put_attr (w, "xmlns", HL_PLAN_NAMESPACE);
  put_count (w, "format-version", HL_PLAN_FORMAT_VERSION);

  start (w, "case");
  put_text_attr (w, "label", plan->label, sizeof plan->label, "case label");
  put_number (w, "mass-kg", plan->mass_kg, "patient mass");
  put_enum (w, "operated-side", (int) plan->side, side_names, N_NAMES (side_names),
            "operated side");
  end (w);

  const HlLimbTableInfo *limb = hl_limb_table_info (plan->model.limb_table);
  if (limb == NULL)
    writer_fail (w, HL_ERR_INVALID, "model limb-table",
                 _("the stance-limb mass table is unknown"));
  start (w, "model");
  put_attr (w, "limb-table", limb ? limb->key : "");
  put_number (w, "limb-fraction", plan->model.limb_fraction_custom, "model limb-fraction");
  put_enum (w, "body-weight-line", (int) plan->model.bw_line, bw_line_names,
            N_NAMES (bw_line_names), "model body-weight-line");
  put_enum (w, "abductor-line", (int) plan->model.abductor_line, abductor_line_names,
            N_NAMES (abductor_line_names), "model abductor-line");
  put_number (w, "abductor-angle-deg", plan->model.abductor_angle_deg,
              "model abductor-angle");
  put_number (w, "lean-mm", plan->model.lean_mm, "model lean");
  end (w);

  start (w, "landmarks");
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      if (!hl_landmarks_has (&plan->landmarks, (HlLandmarkId) i))
        continue;
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      char field[HL_ERROR_FIELD_MAX];
      snprintf (field, sizeof field, "landmark %s", info->key);
      start (w, "landmark");
      put_attr (w, "name", info->key);
      put_number (w, "x-mm", plan->landmarks.p[i].x, field);
      put_number (w, "y-mm", plan->landmarks.p[i].y, field);
      end (w);
    }
  end (w);

  const HlCalibration *cal = &plan->calibration;
  start (w, "calibration");
  put_enum (w, "method", (int) cal->method, cal_method_names,
            N_NAMES (cal_method_names), "calibration method");
  /* A marker or two-point calibration records the magnification its points
   * give, so that a later edit of the points or of the number is caught on
   * load (the landmarks were scaled with it). */
  double recorded_m = cal->magnification;
  if (hl_calibration_complete (cal))
    (void) hl_calibration_magnification (cal, &recorded_m, NULL, NULL);
  put_number (w, "magnification", recorded_m, "calibration magnification");
  put_number (w, "marker-diameter-mm", cal->marker_diameter_mm,
              "calibration marker diameter");
  put_number (w, "known-distance-mm", cal->known_distance_mm,
              "calibration known distance");
  if (cal->n_points < 0 || cal->n_points > 3)
    writer_fail (w, HL_ERR_INVALID, "calibration points",
                 _("the number of calibration points is not between 0 and 3"));
  for (int i = 0; i < cal->n_points && i < 3; i++)
    {
      start (w, "point");
      put_number (w, "x-mm", cal->points[i].x, "calibration point");
      put_number (w, "y-mm", cal->points[i].y, "calibration point");
      end (w);
    }
  end (w);
  write_radiograph (w, &plan->radiograph);

  start (w, "aids");
  start (w, "cane");
  put_bool (w, "enabled", plan->cane.enabled);
  put_enum (w, "hand", (int) plan->cane.hand, hand_names, N_NAMES (hand_names),
            "cane hand");
  put_enum (w, "unit", (int) plan->cane.unit, force_unit_names,
            N_NAMES (force_unit_names), "cane unit");
  put_number (w, "value", plan->cane.value, "cane force");
  put_number (w, "distance-mm", plan->cane.distance_mm, "cane distance");
  end (w);
  for (int h = 0; h < 2; h++)
    {
      const char *field = h == HL_HAND_CONTRALATERAL ? "load contralateral"
                                                     : "load ipsilateral";
      start (w, "hand-load");
      put_attr (w, "hand", hand_names[h]);
      put_number (w, "mass-kg", plan->loads.hand[h].mass_kg, field);
      put_number (w, "distance-mm", plan->loads.hand[h].distance_mm, field);
      end (w);
    }
  start (w, "midline-load");
  put_number (w, "mass-kg", plan->loads.midline_kg, "load midline");
  end (w);
  end (w);

  start (w, "tolerances");
  put_number (w, "global-offset-drop-mm", plan->tol.global_offset_drop_mm,
              "tolerance global-offset");
  put_number (w, "leg-length-mm", plan->tol.leg_length_mm, "tolerance leg-length");
  put_number (w, "abductor-slack-mm", plan->tol.abductor_slack_mm,
              "tolerance abductor-slack");
  end (w);
  start (w, "capacity");
  put_number (w, "torque-nm-per-kg", plan->capacity.torque_nm_per_kg, "capacity torque");
  end (w);
  write_uncertainty (w, &plan->uncertainty);

  start (w, "options");
  for (size_t i = 0; i < plan->n_options; i++)
    {
      HlOption fresh;
      const HlOption *o = option_as_saved (plan, i, &fresh);
      char field[HL_ERROR_FIELD_MAX];
      snprintf (field, sizeof field, "option %zu", i + 1);
      start (w, "option");
      put_text_attr (w, "name", o->name, sizeof o->name, field);
      put_number (w, "cup-medial-mm", o->recon.cup_medial_mm, field);
      put_number (w, "cup-superior-mm", o->recon.cup_superior_mm, field);
      put_number (w, "femoral-offset-mm", o->recon.femoral_offset_mm, field);
      put_number (w, "femoral-length-mm", o->recon.femoral_length_mm, field);
      put_number (w, "head-length-mm", o->recon.head_length_mm, field);
      put_number (w, "neck-shaft-angle-deg", o->recon.neck_shaft_angle_deg, field);
      if (o->recon.tmpl.on)
        write_template (w, &o->recon.tmpl, field);
      end (w);
    }
  end (w);
  write_catalogue_refs (w, plan);

  const char *problem = text_problem (plan->notes, sizeof plan->notes);
  if (problem != NULL)
    {
      char what[HL_ERROR_MESSAGE_MAX / 2];
      snprintf (what, sizeof what, "notes: %s", _(problem));
      writer_fail (w, HL_ERR_INVALID, "notes", what);
    }
  start (w, "notes");
  put_string (w, plan->notes);
  end (w);
  end (w);
}

/* Runs the range checks a reader applies, so that nothing is written that
 * could not be read back. */
static HlStatus
check_for_writing (const HlPlan *plan, HlError *err)
{
  HlError check;
  hl_error_clear (&check);
  HlStatus st = hl_plan_check (plan, &check);
  if (st != HL_OK)
    return hl_error_set (err, st, check.field, _("Cannot write the plan: %s"),
                         check.message);
  return HL_OK;
}

/* A writer into memory, indented by two spaces, the XML declaration
 * written (UTF-8). */
static xmlTextWriterPtr
writer_new (xmlBufferPtr *buffer)
{
  hl_xml_init ();
  *buffer = xmlBufferCreate ();
  xmlTextWriterPtr x = *buffer != NULL ? xmlNewTextWriterMemory (*buffer, 0) : NULL;
  if (x != NULL && (xmlTextWriterSetIndent (x, 1) < 0
                    || xmlTextWriterSetIndentString (x, BAD_CAST "  ") < 0
                    || xmlTextWriterStartDocument (x, "1.0", "UTF-8", NULL) < 0))
    {
      xmlFreeTextWriter (x);
      x = NULL;
    }
  if (x == NULL)
    {
      xmlBufferFree (*buffer);
      *buffer = NULL;
    }
  return x;
}

/* Ends the document and hands its bytes over as malloc'd text. */
static HlStatus
writer_finish (HlWriter *w, xmlBufferPtr buffer, char **out, size_t *size)
{
  if (w->status == HL_OK)
    writer_check (w, xmlTextWriterEndDocument (w->x));
  xmlFreeTextWriter (w->x);   /* flushes into buffer */
  w->x = NULL;
  char *text = NULL;
  size_t len = 0;
  if (w->status == HL_OK)
    {
      len = (size_t) xmlBufferLength (buffer);
      text = malloc (len + 1);
      if (text == NULL)
        writer_check (w, -1);
      else
        {
          memcpy (text, xmlBufferContent (buffer), len);
          text[len] = '\0';
        }
    }
  xmlBufferFree (buffer);
  if (w->status != HL_OK)
    return w->status;
  *out = text;
  if (size != NULL)
    *size = len;
  return HL_OK;
}

static HlStatus
plan_to_buffer_for (const HlPlan *plan, const char *base_file, char **out,
                    size_t *size, HlError *err)
{
  HlStatus st = check_for_writing (plan, err);
  if (st != HL_OK)
    return st;

  xmlBufferPtr buffer;
  HlWriter w = { writer_new (&buffer), err, HL_OK, base_file };
  if (w.x == NULL)
    return hl_error_set (err, HL_ERR_NOMEM, "", _("Out of memory while writing the plan"));
  write_plan_element (&w, plan);
  return writer_finish (&w, buffer, out, size);
}

HlStatus
hl_plan_to_buffer (const HlPlan *plan, char **out, size_t *size, HlError *err)
{
  return plan_to_buffer_for (plan, NULL, out, size, err);
}

/* ---- The planning summary --------------------------------------------- */

/* Accepts YYYY-MM-DDTHH:MM:SS[.fraction](Z|+hh:mm|-hh:mm), the xs:dateTime
 * forms a summary may carry: GLib reads the date (the calendar, the zone);
 * the layout is checked here because GLib also takes forms the schema does
 * not (a space for the "T", no seconds, no zone). */
static bool
iso_date_valid (const char *s)
{
  static const char layout[] = "dddd-dd-ddTdd:dd:dd";
  size_t n = strlen (s);
  if (n < sizeof layout - 1)
    return false;
  for (size_t i = 0; i + 1 < sizeof layout; i++)
    if (layout[i] == 'd' ? !is_digit (s[i]) : s[i] != layout[i])
      return false;
  const char *p = s + sizeof layout - 1;
  if (*p == '.')
    {
      p++;
      if (!is_digit (*p))
        return false;
      while (is_digit (*p))
        p++;
    }
  if (strcmp (p, "Z") != 0
      && !((*p == '+' || *p == '-') && strlen (p) == 6 && is_digit (p[1]) && is_digit (p[2])
           && p[3] == ':' && is_digit (p[4]) && is_digit (p[5])))
    return false;
  GDateTime *dt = g_date_time_new_from_iso8601 (s, NULL);
  if (dt == NULL)
    return false;
  g_date_time_unref (dt);
  return true;
}

/* A measure only when its landmarks are placed. */
static bool
measure_known (double v)
{
  return isfinite (v);
}

/* <measures> of one result's landmarks; nothing when none can be taken. */
static void
write_measures (HlWriter *w, const HlPlan *plan, size_t row)
{
  HlMeasures ms;
  hl_row_measures (plan, row, &ms);

  struct { char name[64]; double v; } values[16];
  size_t n = 0;
  const struct { const char *prefix; const HlSideMeasures *m; } sides[] = {
    { "", &ms.operated }, { "other-", &ms.other },
  };
  for (size_t i = 0; i < 2; i++)
    {
      const HlSideMeasures *m = sides[i].m;
      const struct { const char *key; double v; } side_values[] = {
        { "acetabular-offset-mm", m->acetabular_offset_mm },
        { "femoral-offset-mm", m->femoral_offset_mm },
        { "global-offset-mm", m->global_offset_mm },
        { "hip-centre-height-mm", m->hip_centre_height_mm },
        { "leg-length-mm", m->leg_length_mm },
      };
      for (size_t k = 0; k < sizeof side_values / sizeof side_values[0]; k++)
        if (measure_known (side_values[k].v))
          {
            snprintf (values[n].name, sizeof values[n].name, "%s%s", sides[i].prefix,
                      side_values[k].key);
            values[n++].v = side_values[k].v;
          }
    }
  const struct { const char *key; double v; } differences[] = {
    { "leg-length-difference-mm", ms.leg_length_difference_mm },
    { "global-offset-difference-mm", ms.global_offset_difference_mm },
    { "femoral-offset-difference-mm", ms.femoral_offset_difference_mm },
    { "acetabular-offset-difference-mm", ms.acetabular_offset_difference_mm },
    { "hip-centre-height-difference-mm", ms.hip_centre_height_difference_mm },
  };
  for (size_t k = 0; k < sizeof differences / sizeof differences[0]; k++)
    if (measure_known (differences[k].v))
      {
        snprintf (values[n].name, sizeof values[n].name, "%s", differences[k].key);
        values[n++].v = differences[k].v;
      }
  if (n == 0)
    return;

  start (w, "measures");
  for (size_t k = 0; k < n; k++)
    put_result_number (w, values[k].name, values[k].v);
  double m;
  bool assumed;
  if (hl_calibration_magnification (&plan->calibration, &m, &assumed, NULL) == HL_OK)
    {
      put_result_number (w, "magnification", m);
      put_bool (w, "magnification-assumed", assumed);
    }
  put_bool (w, "side-contradiction", ms.side_contradiction);
  end (w);
}

/* The implants of a templated option and the four numbers they make
 * (derived="now" from the resolved template, "saved" while the catalogue
 * is missing or changed). */
static void
write_implants (HlWriter *w, const HlPlan *plan, size_t index)
{
  HlOption fresh;
  const HlOption *o = option_as_saved (plan, index, &fresh);
  const HlTemplate *t = &o->recon.tmpl;
  const struct { const char *attr; const char *v; } texts[] = {
    { "catalogue", t->catalogue }, { "cup-family", t->cup_family },
    { "liner", t->liner }, { "stem-family", t->stem_family },
    { "stem-size", t->stem_size }, { "version", t->version },
  };
  start (w, "implants");
  for (size_t i = 0; i < sizeof texts / sizeof texts[0]; i++)
    put_attr (w, texts[i].attr, texts[i].v);
  put_result_number (w, "cup-diameter-mm", t->cup_diameter_mm);
  put_result_number (w, "inclination-deg", t->inclination_deg);
  put_result_number (w, "seat-mm", t->seat_mm);
  put_result_number (w, "head-length-mm", t->head_length_mm);
  put_result_number (w, "cup-medial-mm", o->recon.cup_medial_mm);
  put_result_number (w, "cup-superior-mm", o->recon.cup_superior_mm);
  put_result_number (w, "femoral-offset-mm", o->recon.femoral_offset_mm);
  put_result_number (w, "femoral-length-mm", o->recon.femoral_length_mm);
  /* where the seat is measured from (templating.md section 2) */
  HlTemplateFrame f;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  put_attr (w, "seat-from", f.t_from_hip_centre ? "hip-centre" : "lesser-trochanter");
  put_attr (w, "derived", t->resolved ? "now" : "saved");
  end (w);
}

/* The explanation of an implausible result, printf'd by hl-solve.c in the
 * thread's locale: in a machine file its numbers too have a point, so it
 * is made with only this thread's LC_NUMERIC switched to "C" (messages
 * stay translated, other threads are not affected). */
static void
implausible_text_c_numeric (const HlResult *r, char *why, size_t size)
{
  locale_t base = duplocale (uselocale ((locale_t) 0));
  locale_t c = base != (locale_t) 0 ? newlocale (LC_NUMERIC_MASK, "C", base) : (locale_t) 0;
  if (c == (locale_t) 0 && base != (locale_t) 0)
    freelocale (base);
  locale_t old = c != (locale_t) 0 ? uselocale (c) : (locale_t) 0;
  hl_implausible_describe_all (r, " ", why, size);
  if (c != (locale_t) 0)
    {
      uselocale (old);
      freelocale (c);
    }
}

static void
write_result (HlWriter *w, const HlResult *r, const HlMcSummary *mc, long index,
              const char *name, const HlPlan *plan)
{
  start (w, "result");
  if (index < 0)
    put_attr (w, "kind", "native");
  else
    {
      put_attr (w, "kind", "option");
      put_count (w, "option-index", (uint64_t) index);
      put_attr (w, "option-name", name);
    }
  const HlResultField *fields[HL_RESULT_FIELD_MAX];
  size_t n_fields = hl_result_fields_summary (fields);
  for (size_t k = 0; k < n_fields; k++)
    {
      put_result_number (w, fields[k]->xml, fields[k]->get (r));
      /* the sense of the joint force follows its angle */
      if (strcmp (fields[k]->xml, "joint-force-angle-deg") == 0)
        put_attr (w, "joint-force-sense", hl_result_jrf_sense (r));
    }
  if (mc != NULL)     /* NULL: the ranges were not computed (a <refusal> says why) */
    {
      put_result_number (w, "jrf-bw-p05", mc->jrf_bw.p05);
      put_result_number (w, "jrf-bw-p50", mc->jrf_bw.p50);
      put_result_number (w, "jrf-bw-p95", mc->jrf_bw.p95);
      put_result_number (w, "abductor-force-bw-p05", mc->abductor_force_bw.p05);
      put_result_number (w, "abductor-force-bw-p50", mc->abductor_force_bw.p50);
      put_result_number (w, "abductor-force-bw-p95", mc->abductor_force_bw.p95);
      if (index >= 0)
        put_result_number (w, "share-lower-than-native", mc->share_lower_jrf);
    }

  GString *flags = g_string_new (NULL);
  for (unsigned bit = 1; bit != 0 && bit <= HL_FLAG_LAST; bit <<= 1)
    if (r->flags & bit)
      g_string_append_printf (flags, "%s%s", flags->len > 0 ? " " : "",
                              hl_flag_key ((HlFlag) bit));
  put_attr (w, "flags", flags->str);
  g_string_free (flags, TRUE);

  for (unsigned bit = 1; bit != 0 && bit <= HL_FLAG_LAST; bit <<= 1)
    if (r->flags & bit)
      {
        start (w, "flag");
        put_attr (w, "key", hl_flag_key ((HlFlag) bit));
        put_string (w, hl_flag_text ((HlFlag) bit));
        if (bit == HL_FLAG_IMPLAUSIBLE)
          {
            char why[4 * HL_ERROR_MESSAGE_MAX];
            implausible_text_c_numeric (r, why, sizeof why);
            put_string (w, " ");
            put_string (w, why);
          }
        end (w);
      }
  if (index >= 0 && plan->options[index].recon.tmpl.on)
    write_implants (w, plan, (size_t) index);
  write_measures (w, plan, index < 0 ? 0 : (size_t) index + 1);
  end (w);
}

/* What a summary shows: native and each option solved on its own, a
 * refused row keeping its refusal instead of numbers, and the Monte Carlo
 * ranges of native and the options that solved.  A plan that loads always
 * has one (only running out of memory stops it). */
typedef struct {
  HlResult *results;       /* 1 + n_options rows, 0 native */
  HlError *row_errors;     /* a row's refusal; status HL_OK when it solved */
  HlError prepare;         /* the plan's refusal: nothing could be solved */
  HlMcSummary *mc;         /* 1 + n_options, or NULL: not computed */
  HlMcInfo mc_info;
  HlError mc_error;        /* why the ranges were not computed */
} HlSummaryData;

static void
summary_data_clear (HlSummaryData *d)
{
  free (d->results);
  free (d->row_errors);
  free (d->mc);
  memset (d, 0, sizeof *d);
}

static HlStatus
summary_nomem (HlError *err)
{
  return hl_error_set (err, HL_ERR_NOMEM, "", _("Out of memory while solving the plan"));
}

/* The Monte Carlo ranges of native and the options that solved (native
 * solved). */
static HlStatus
summary_uncertainty (const HlPlan *plan, const HlModel *model, HlSummaryData *d,
                     HlError *err)
{
  const size_t rows = 1 + plan->n_options;
  size_t n_ok = 0;
  HlOption *solved = malloc (rows * sizeof *solved);
  size_t *row_of = malloc (rows * sizeof *row_of);
  HlMcSummary *mc = calloc (rows, sizeof *mc);
  HlMcSettings settings;
  hl_mc_settings_for_plan (plan, &settings, NULL);
  HlMcWorkspace *ws = hl_mc_workspace_new (settings.n_samples,
                                           plan->n_options > 0 ? plan->n_options : 1);
  HlStatus st = HL_OK;
  if (solved == NULL || row_of == NULL || mc == NULL || ws == NULL)
    st = hl_error_set (err, HL_ERR_NOMEM, "uncertainty",
                       _("Out of memory for the uncertainty samples"));
  else
    {
      for (size_t i = 0; i < plan->n_options; i++)
        if (d->row_errors[1 + i].status == HL_OK)
          {
            solved[n_ok] = plan->options[i];
            row_of[n_ok++] = 1 + i;
          }
      HlStatus run = hl_mc_run (ws, model, solved, n_ok, &settings, mc, &d->mc_info,
                                &d->mc_error);
      if (run == HL_ERR_NOMEM)
        {
          if (err != NULL)
            *err = d->mc_error;
          st = run;
        }
      else if (run == HL_OK)
        {
          d->mc = calloc (rows, sizeof *d->mc);
          if (d->mc == NULL)
            st = hl_error_set (err, HL_ERR_NOMEM, "uncertainty",
                               _("Out of memory for the uncertainty samples"));
          else
            {
              d->mc[0] = mc[0];
              for (size_t k = 0; k < n_ok; k++)
                d->mc[row_of[k]] = mc[1 + k];
            }
        }
    }
  hl_mc_workspace_free (ws);
  free (solved);
  free (row_of);
  free (mc);
  return st;
}

static HlStatus
summary_solve (const HlPlan *plan, HlSummaryData *d, HlError *err)
{
  const size_t rows = 1 + plan->n_options;
  memset (d, 0, sizeof *d);
  d->results = calloc (rows, sizeof *d->results);
  d->row_errors = calloc (rows, sizeof *d->row_errors);
  if (d->results == NULL || d->row_errors == NULL)
    {
      summary_data_clear (d);
      return summary_nomem (err);
    }
  hl_error_clear (&d->prepare);
  hl_error_clear (&d->mc_error);
  HlModel model;
  if (hl_model_prepare (&model, plan, &d->prepare) != HL_OK)
    {
      if (d->prepare.status == HL_ERR_NOMEM)
        {
          if (err != NULL)
            *err = d->prepare;
          summary_data_clear (d);
          return HL_ERR_NOMEM;
        }
      return HL_OK;
    }
  for (size_t i = 0; i < rows; i++)
    {
      hl_error_clear (&d->row_errors[i]);
      if (hl_model_solve (&model, i == 0 ? NULL : &plan->options[i - 1].recon,
                          &d->results[i], &d->row_errors[i]) != HL_OK)
        {
          memset (&d->results[i], 0, sizeof d->results[i]);
          if (d->row_errors[i].status == HL_OK)     /* a refusal always says why */
            d->row_errors[i].status = HL_ERR_DEGENERATE;
        }
    }
  HlStatus st = HL_OK;
  if (d->row_errors[0].status != HL_OK)
    hl_error_set (&d->mc_error, HL_ERR_DEGENERATE, "uncertainty",
                  _("The uncertainty ranges were not computed: native cannot be solved"));
  else
    st = summary_uncertainty (plan, &model, d, err);
  if (st != HL_OK)
    summary_data_clear (d);
  return st;
}

/* The first refusal a summary carries, worded as hl_plan_solve_all and
 * the uncertainty would word it; false when there is none. */
static bool
summary_first_refusal (const HlPlan *plan, const HlSummaryData *d, HlError *err)
{
  if (d->prepare.status != HL_OK)
    {
      if (err != NULL)
        *err = d->prepare;
      return true;
    }
  for (size_t i = 0; i <= plan->n_options; i++)
    if (d->row_errors[i].status != HL_OK)
      {
        if (err != NULL)
          {
            *err = d->row_errors[i];
            hl_solve_refusal (err, plan, i);
          }
        return true;
      }
  if (d->mc == NULL)
    {
      if (err != NULL)
        *err = d->mc_error;
      return true;
    }
  return false;
}

/* <refusal>: what could not be solved, in place of its numbers. */
static void
write_refusal (HlWriter *w, const char *kind, long index, const char *name,
               const HlError *e)
{
  start (w, "refusal");
  put_attr (w, "kind", kind);
  if (index >= 0)
    {
      put_count (w, "option-index", (uint64_t) index);
      put_attr (w, "option-name", name);
    }
  if (e->field[0] != '\0')
    {
      put_attr (w, "field", e->field);
      /* "landmark KEY": the landmark on its own too */
      const char *lm = strncmp (e->field, "landmark ", 9) == 0 ? e->field + 9 : NULL;
      if (lm != NULL && hl_landmark_from_key (lm) != HL_LM_COUNT)
        put_attr (w, "landmark", lm);
    }
  put_string (w, e->message);
  end (w);
}

static void
write_results (HlWriter *w, const HlPlan *plan, const HlSummaryData *d)
{
  start (w, "results");
  if (d->prepare.status != HL_OK)
    write_refusal (w, "plan", -1, NULL, &d->prepare);
  else
    {
      for (size_t i = 0; i <= plan->n_options; i++)
        {
          long index = (long) i - 1;
          const char *name = i == 0 ? NULL : plan->options[i - 1].name;
          if (d->row_errors[i].status != HL_OK)
            write_refusal (w, i == 0 ? "native" : "option", index, name,
                           &d->row_errors[i]);
          else
            write_result (w, &d->results[i], d->mc != NULL ? &d->mc[i] : NULL, index,
                          name, plan);
        }
      if (d->mc == NULL)
        write_refusal (w, "uncertainty", -1, NULL, &d->mc_error);
    }
  end (w);
}

/* solved_only: a plan whose summary would carry a refusal is refused with
 * it, and nothing is made (the command line's contract). */
static HlStatus
summary_to_buffer_for (const HlPlan *plan, const char *date_iso, const char *base_file,
                       bool solved_only, char **out, size_t *size, HlError *err)
{
  char now[HL_ISO_DATE_MAX];
  if (date_iso == NULL)
    {
      GDateTime *dt = g_date_time_new_now_utc ();
      gchar *text = dt != NULL ? g_date_time_format (dt, "%Y-%m-%dT%H:%M:%SZ") : NULL;
      if (dt != NULL)
        g_date_time_unref (dt);
      if (text == NULL || strlen (text) >= sizeof now)
        {
          g_free (text);
          return hl_error_set (err, HL_ERR_INVALID, "date",
                               _("Cannot read the current date and time"));
        }
      snprintf (now, sizeof now, "%s", text);
      g_free (text);
      date_iso = now;
    }
  else if (!iso_date_valid (date_iso))
    return hl_error_set (err, HL_ERR_INVALID, "date",
                         _("The date \"%.40s\" is not an ISO 8601 date and time "
                           "such as 2026-03-01T09:30:00Z"), date_iso);

  HlStatus st = check_for_writing (plan, err);
  if (st != HL_OK)
    return st;

  HlSummaryData d;
  st = summary_solve (plan, &d, err);
  if (st != HL_OK)
    return st;
  HlError refusal;
  if (solved_only && summary_first_refusal (plan, &d, &refusal))
    {
      summary_data_clear (&d);
      if (err != NULL)
        *err = refusal;
      return refusal.status;
    }

  /* The <plan> element as the plan file has it, byte for byte: its digest
   * can be checked against either. */
  char *plan_text = NULL;
  size_t plan_len = 0;
  st = plan_to_buffer_for (plan, base_file, &plan_text, &plan_len, err);
  if (st != HL_OK)
    {
      summary_data_clear (&d);
      return st;
    }
  const char *element = strstr (plan_text, "<plan ");
  size_t element_len = element != NULL ? plan_len - (size_t) (element - plan_text) : 0;
  /* The digest covers "<plan " to "</plan>" without the final newline. */
  while (element_len > 0 && element[element_len - 1] == '\n')
    element_len--;
  char hex[HL_SHA256_HEX_SIZE];
  hl_sha256_hex (element != NULL ? element : "", element_len, hex);

  xmlBufferPtr buffer = NULL;
  HlWriter w = { element != NULL ? writer_new (&buffer) : NULL, err, HL_OK, base_file };
  if (w.x == NULL)
    {
      free (plan_text);
      summary_data_clear (&d);
      return hl_error_set (err, HL_ERR_NOMEM, "", _("Out of memory while writing the plan"));
    }
  start (&w, "planning-summary");
  put_attr (&w, "xmlns", HL_PLAN_NAMESPACE);
  put_count (&w, "format-version", HL_PLAN_FORMAT_VERSION);
  start (&w, "caution");
  put_string (&w, hl_caution_text ());
  end (&w);
  start (&w, "provenance");
  put_attr (&w, "program-version", hl_program_version ());
  put_attr (&w, "model-version", HL_MODEL_VERSION);
  put_attr (&w, "created", date_iso);
  put_attr (&w, "plan-sha256", hex);
  if (d.mc != NULL)
    {
      put_count (&w, "uncertainty-seed", d.mc_info.seed);
      put_count (&w, "uncertainty-samples-used", d.mc_info.n_used);
      put_count (&w, "uncertainty-samples-dropped", d.mc_info.n_dropped);
    }
  end (&w);
  if (w.status == HL_OK)
    {
      writer_check (&w, xmlTextWriterWriteRawLen (w.x, BAD_CAST element, (int) element_len));
      writer_check (&w, xmlTextWriterWriteRaw (w.x, BAD_CAST "\n"));
    }
  write_results (&w, plan, &d);
  end (&w);
  free (plan_text);
  summary_data_clear (&d);
  return writer_finish (&w, buffer, out, size);
}

HlStatus
hl_summary_to_buffer (const HlPlan *plan, const char *date_iso, char **out,
                      size_t *size, HlError *err)
{
  return summary_to_buffer_for (plan, date_iso, NULL, false, out, size, err);
}

HlStatus
hl_summary_to_buffer_solved (const HlPlan *plan, const char *date_iso, char **out,
                             size_t *size, HlError *err)
{
  return summary_to_buffer_for (plan, date_iso, NULL, true, out, size, err);
}

/* Writes text the caller no longer needs, then frees it; a failure to make
 * the text (st) is passed on. */
static HlStatus
write_owned_text (HlStatus st, const char *path, char *text, size_t size, bool backup,
                  HlError *err)
{
  if (st == HL_OK)
    st = backup ? hl_write_file_atomic_backup (path, text, size, err)
                : hl_write_file_atomic (path, text, size, err);
  free (text);
  return st;
}

HlStatus
hl_plan_save_file_backup (const HlPlan *plan, const char *path, HlError *err)
{
  char *text = NULL;
  size_t size = 0;
  HlStatus st = plan_to_buffer_for (plan, path, &text, &size, err);
  return write_owned_text (st, path, text, size, true, err);
}

HlStatus
hl_plan_save_file (const HlPlan *plan, const char *path, HlError *err)
{
  char *text = NULL;
  size_t size = 0;
  HlStatus st = plan_to_buffer_for (plan, path, &text, &size, err);
  return write_owned_text (st, path, text, size, false, err);
}

HlStatus
hl_summary_save_file (const HlPlan *plan, const char *path, HlError *err)
{
  char *text = NULL;
  size_t size = 0;
  HlStatus st = summary_to_buffer_for (plan, NULL, path, false, &text, &size, err);
  return write_owned_text (st, path, text, size, false, err);
}

HlStatus
hl_summary_save_file_solved (const HlPlan *plan, const char *path, HlError *err)
{
  char *text = NULL;
  size_t size = 0;
  HlStatus st = summary_to_buffer_for (plan, NULL, path, true, &text, &size, err);
  return write_owned_text (st, path, text, size, false, err);
}

/* ---- Reading ------------------------------------------------------------ */

/* The element nodes each part of a plan came from, to point at the right
 * line when a range check fails after reading. */
typedef struct {
  xmlNodePtr plan;
  xmlNodePtr case_;
  xmlNodePtr model;
  xmlNodePtr landmarks;
  xmlNodePtr landmark[HL_LM_COUNT];
  xmlNodePtr calibration;
  xmlNodePtr radiograph;
  xmlNodePtr cane;
  xmlNodePtr hand_load[2];
  xmlNodePtr midline_load;
  xmlNodePtr tolerances;
  xmlNodePtr capacity;
  xmlNodePtr uncertainty;
  xmlNodePtr *option;
  size_t n_option;
} HlPlanNodes;

typedef struct {
  HlXmlLoad x;               /* the load: its file name, error, status */
  const char *base_file;     /* the plan file: image paths resolve against it */
} HlReader;

static void
describe_element (xmlNodePtr node, char *out, size_t size)
{
  if (node == NULL || node->type != XML_ELEMENT_NODE)
    {
      snprintf (out, size, "%s", "");
      return;
    }
  static const char *const id_attrs[] = { "name", "hand", "kind" };
  for (int i = 0; i < N_NAMES (id_attrs); i++)
    {
      xmlChar *v = xmlGetNoNsProp (node, (const xmlChar *) id_attrs[i]);
      if (v != NULL)
        {
          char q[HL_QUOTE_BUF];
          snprintf (out, size, "<%s %s=\"%s\">", (const char *) node->name, id_attrs[i],
                    hl_text_quote ((const char *) v, HL_QUOTED_VALUE_MAX, q, sizeof q));
          hl_utf8_trim_end (out);
          xmlFree (v);
          return;
        }
    }
  snprintf (out, size, "<%s>", (const char *) node->name);
}

#define node_line hl_xml_node_line

/* Records the first failure as "NAME: line N, element <E>: message". */
#define reader_fail_at(r, ...) hl_xml_fail_at (&(r)->x, __VA_ARGS__)

static HlStatus reader_fail (HlReader *r, HlStatus status, xmlNodePtr node,
                             const char *fmt, ...)
  __attribute__ ((format (printf, 4, 5)));

static HlStatus
reader_fail (HlReader *r, HlStatus status, xmlNodePtr node, const char *fmt, ...)
{
  char element[HL_ERROR_FIELD_MAX];
  char what[HL_ERROR_MESSAGE_MAX];
  va_list ap;

  describe_element (node, element, sizeof element);
  va_start (ap, fmt);
  vsnprintf (what, sizeof what, fmt, ap);
  va_end (ap);
  return reader_fail_at (r, status, node_line (node), element, "%s", what);
}

static const HlEnumAttr *
find_enum_attr (const char *attr)
{
  for (int i = 0; i < N_NAMES (enum_attrs); i++)
    if (strcmp (enum_attrs[i].attr, attr) == 0)
      return &enum_attrs[i];
  return NULL;
}

static bool
is_number_attr (const char *attr)
{
  for (int i = 0; i < N_NAMES (number_attrs); i++)
    if (strcmp (number_attrs[i], attr) == 0)
      return true;
  return false;
}

static void
join_names (const HlEnumAttr *e, char *out, size_t size)
{
  size_t n = 0;
  out[0] = '\0';
  for (int i = 0; i < e->n && n < size; i++)
    n += (size_t) snprintf (out + n, size - n, "%s%s", i ? ", " : "", e->names[i]);
}

/* A clear message for a bad value of `attr` on `node`, if it has one. */
static bool
diagnose_value (HlReader *r, xmlNodePtr node, const char *attr, const char *value)
{
  if (is_number_attr (attr))
    {
      double v;
      switch (parse_number (value, &v))
        {
        case HL_NUMBER_OK:
          return false;
        case HL_NUMBER_NOT_FINITE:
          reader_fail (r, HL_ERR_PARSE, node,
                       _("attribute %s is '%.*s', not a finite number"), attr,
                       HL_QUOTE (value));
          return true;
        case HL_NUMBER_NOT_A_NUMBER:
        default:
          reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is '%.*s', not a number"),
                       attr, HL_QUOTE (value));
          return true;
        }
    }
  if (strcmp (attr, "samples") == 0 || strcmp (attr, "seed") == 0)
    {
      bool samples = attr[1] == 'a';
      const char *t = value;
      bool digits = *t != '\0';
      for (; *t != '\0'; t++)
        digits = digits && is_digit (*t);
      errno = 0;
      unsigned long long n = digits ? strtoull (value, NULL, 10) : 0;
      if (digits && errno == 0 && (!samples || (n >= 1 && n <= HL_MC_PLAN_SAMPLES_MAX)))
        return false;
      if (samples)
        reader_fail (r, HL_ERR_PARSE, node,
                     _("attribute samples is '%.*s', not a whole number from 1 to %d"),
                     HL_QUOTE (value), HL_MC_PLAN_SAMPLES_MAX);
      else
        reader_fail (r, HL_ERR_PARSE, node,
                     _("attribute seed is '%.*s', not a whole number from 0 to "
                       "18446744073709551615"), HL_QUOTE (value));
      return true;
    }
  if (strcmp (attr, "enabled") == 0)
    {
      static const char *const booleans[] = { "true", "false", "1", "0" };
      for (int i = 0; i < N_NAMES (booleans); i++)
        if (strcmp (value, booleans[i]) == 0)
          return false;
      reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is '%.*s', not true or false"),
                   attr, HL_QUOTE (value));
      return true;
    }
  const HlEnumAttr *e = find_enum_attr (attr);
  if (e != NULL)
    {
      for (int i = 0; i < e->n; i++)
        if (strcmp (value, e->names[i]) == 0)
          return false;
      char names[160];
      join_names (e, names, sizeof names);
      reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is '%.*s', not one of: %s"),
                   attr, HL_QUOTE (value), names);
      return true;
    }
  return false;
}

static bool
diagnose_element (HlReader *r, xmlNodePtr node)
{
  for (xmlAttrPtr a = node->properties; a != NULL; a = a->next)
    {
      xmlChar *v = xmlNodeListGetString (node->doc, a->children, 1);
      bool found = diagnose_value (r, node, (const char *) a->name,
                                   v ? (const char *) v : "");
      xmlFree (v);
      if (found)
        return true;
    }
  return false;
}

/* ---- Reading attributes ----------------------------------------------- */

static bool
node_is (xmlNodePtr node, const char *name)
{
  return node->type == XML_ELEMENT_NODE && node->ns != NULL
         && xmlStrcmp (node->ns->href, (const xmlChar *) HL_PLAN_NAMESPACE) == 0
         && xmlStrcmp (node->name, (const xmlChar *) name) == 0;
}

static bool
get_number (HlReader *r, xmlNodePtr node, const char *attr, bool required, double *out)
{
  xmlChar *v = xmlGetNoNsProp (node, (const xmlChar *) attr);
  if (v == NULL)
    {
      if (required)
        reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is missing"), attr);
      return !required;
    }
  double d;
  bool ok = parse_number ((const char *) v, &d) == HL_NUMBER_OK;
  if (ok)
    *out = d;
  else
    diagnose_value (r, node, attr, (const char *) v);
  xmlFree (v);
  return ok;
}

static bool
get_enum (HlReader *r, xmlNodePtr node, const char *attr, bool required, int *out)
{
  const HlEnumAttr *e = find_enum_attr (attr);
  xmlChar *v = xmlGetNoNsProp (node, (const xmlChar *) attr);
  if (v == NULL)
    {
      if (required)
        reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is missing"), attr);
      return !required;
    }
  bool ok = false;
  for (int i = 0; e != NULL && i < e->n; i++)
    if (strcmp ((const char *) v, e->names[i]) == 0)
      {
        *out = i;
        ok = true;
      }
  if (!ok)
    diagnose_value (r, node, attr, (const char *) v);
  xmlFree (v);
  return ok;
}

static bool
get_bool (HlReader *r, xmlNodePtr node, const char *attr, bool *out)
{
  xmlChar *v = xmlGetNoNsProp (node, (const xmlChar *) attr);
  if (v == NULL)
    return true;
  const char *s = (const char *) v;
  bool ok = true;
  if (strcmp (s, "true") == 0 || strcmp (s, "1") == 0)
    *out = true;
  else if (strcmp (s, "false") == 0 || strcmp (s, "0") == 0)
    *out = false;
  else
    {
      reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is '%.*s', not true or false"),
                   attr, HL_QUOTE (s));
      ok = false;
    }
  xmlFree (v);
  return ok;
}

static bool
copy_text (HlReader *r, xmlNodePtr node, const char *what, const char *text,
           char *dst, size_t size)
{
  size_t len = strlen (text);
  if (len >= size)
    {
      reader_fail (r, HL_ERR_PARSE, node,
                   _("%s is %zu bytes long, more than the %zu allowed"), what, len,
                   size - 1);
      return false;
    }
  memcpy (dst, text, len + 1);
  return true;
}

static bool
get_text_attr (HlReader *r, xmlNodePtr node, const char *attr, char *dst, size_t size)
{
  xmlChar *v = xmlGetNoNsProp (node, (const xmlChar *) attr);
  if (v == NULL)
    {
      reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is missing"), attr);
      return false;
    }
  char what[64];
  snprintf (what, sizeof what, _("attribute %s"), attr);
  bool ok = copy_text (r, node, what, (const char *) v, dst, size);
  xmlFree (v);
  return ok;
}

/* ---- Reading the plan element ----------------------------------------- */

static bool
read_case (HlReader *r, xmlNodePtr node, HlPlan *plan)
{
  int side = (int) plan->side;
  char unsafe[96];
  bool ok = get_text_attr (r, node, "label", plan->label, sizeof plan->label);
  if (ok && hl_text_unsafe (plan->label, unsafe, sizeof unsafe) != NULL)
    {
      reader_fail (r, HL_ERR_PARSE, node, _("the case label holds %s; labels must be "
                                            "one line of plain text"), unsafe);
      ok = false;
    }
  ok = ok && get_number (r, node, "mass-kg", true, &plan->mass_kg)
            && get_enum (r, node, "operated-side", true, &side);
  plan->side = (HlSide) side;
  return ok;
}

static bool
read_model (HlReader *r, xmlNodePtr node, HlPlan *plan)
{
  HlModelChoices *m = &plan->model;
  xmlChar *key = xmlGetNoNsProp (node, (const xmlChar *) "limb-table");
  if (key != NULL)
    {
      HlLimbTable t = hl_limb_table_from_key ((const char *) key);
      if (t == HL_LIMB_N)
        reader_fail (r, HL_ERR_PARSE, node,
                     _("attribute limb-table is '%.*s', not a known stance-limb mass table"),
                     HL_QUOTE (key));
      else
        m->limb_table = t;
      xmlFree (key);
      if (t == HL_LIMB_N)
        return false;
    }
  int bw_line = (int) m->bw_line;
  int line_mode = (int) m->abductor_line;
  bool ok = get_number (r, node, "limb-fraction", false, &m->limb_fraction_custom)
            && get_enum (r, node, "body-weight-line", false, &bw_line)
            && get_enum (r, node, "abductor-line", false, &line_mode)
            && get_number (r, node, "abductor-angle-deg", false, &m->abductor_angle_deg)
            && get_number (r, node, "lean-mm", false, &m->lean_mm);
  m->bw_line = (HlBwLine) bw_line;
  m->abductor_line = (HlAbductorLineMode) line_mode;
  return ok;
}

static bool
read_landmarks (HlReader *r, xmlNodePtr node, HlPlan *plan, HlPlanNodes *nodes)
{
  for (xmlNodePtr c = node->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      if (!node_is (c, "landmark"))
        {
          reader_fail (r, HL_ERR_PARSE, c, _("unexpected element in <landmarks>"));
          return false;
        }
      xmlChar *key = xmlGetNoNsProp (c, (const xmlChar *) "name");
      HlLandmarkId id = hl_landmark_from_key (key ? (const char *) key : "");
      xmlFree (key);
      if (id == HL_LM_COUNT)
        {
          reader_fail (r, HL_ERR_PARSE, c, _("unknown landmark name"));
          return false;
        }
      if (hl_landmarks_has (&plan->landmarks, id))
        {
          reader_fail (r, HL_ERR_PARSE, c, _("landmark %s is given twice"),
                       hl_landmark_info (id)->key);
          return false;
        }
      double x, y;
      if (!get_number (r, c, "x-mm", true, &x) || !get_number (r, c, "y-mm", true, &y))
        return false;
      hl_landmarks_set (&plan->landmarks, id, x, y);
      nodes->landmark[id] = c;
    }

  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      if (info->required && !hl_landmarks_has (&plan->landmarks, (HlLandmarkId) i))
        {
          reader_fail (r, HL_ERR_PARSE, node,
                       _("the required landmark %s (%s) is missing"), info->key,
                       _(info->label));
          return false;
        }
    }
  return true;
}

static bool
read_calibration (HlReader *r, xmlNodePtr node, HlPlan *plan)
{
  HlCalibration *cal = &plan->calibration;
  int method = (int) cal->method;
  if (!get_enum (r, node, "method", false, &method)
      || !get_number (r, node, "magnification", false, &cal->magnification)
      || !get_number (r, node, "marker-diameter-mm", false, &cal->marker_diameter_mm)
      || !get_number (r, node, "known-distance-mm", false, &cal->known_distance_mm))
    return false;
  cal->method = (HlCalMethod) method;

  cal->n_points = 0;
  for (xmlNodePtr c = node->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      if (!node_is (c, "point") || cal->n_points >= 3)
        {
          reader_fail (r, HL_ERR_PARSE, c,
                       _("a calibration holds at most three <point> elements"));
          return false;
        }
      HlVec2 *p = &cal->points[cal->n_points];
      if (!get_number (r, c, "x-mm", true, &p->x) || !get_number (r, c, "y-mm", true, &p->y))
        return false;
      cal->n_points++;
    }

  /* The points must agree with the magnification the file records: the
   * landmarks were scaled with that one.  An implausible magnification is
   * left to hl_plan_check, which names it. */
  double from_points;
  if (hl_calibration_complete (cal)
      && hl_calibration_magnification (cal, &from_points, NULL, NULL) == HL_OK)
    {
      xmlChar *recorded = xmlGetNoNsProp (node, (const xmlChar *) "magnification");
      bool has_recorded = recorded != NULL;
      xmlFree (recorded);
      if (has_recorded
          && !(fabs (from_points - cal->magnification) <= HL_MAGNIFICATION_AGREE_TOL))
        {
          /* Three decimals, or "1e+308" for a value far out (never 300
           * digits). */
          char points_text[HL_NUMBER_TEXT_SIZE], recorded_text[HL_NUMBER_TEXT_SIZE];
          const double far = 1e6;
          hl_format_number (points_text, sizeof points_text,
                            fabs (from_points) < far ? 3 : HL_NUMBER_EXACT, from_points);
          hl_format_number (recorded_text, sizeof recorded_text,
                            fabs (cal->magnification) < far ? 3 : HL_NUMBER_EXACT,
                            cal->magnification);
          reader_fail (r, HL_ERR_PARSE, node,
                       _("the calibration points give a magnification of %s, but "
                         "the plan records %s: the points or the magnification "
                         "were changed after the landmarks were scaled, so the "
                         "landmarks may be at the wrong scale; correct the "
                         "magnification attribute or the points so they agree"),
                       points_text, recorded_text);
          return false;
        }
      cal->magnification = from_points;
    }
  return true;
}

static bool
read_radiograph (HlReader *r, xmlNodePtr node, HlPlan *plan)
{
  HlRadiograph *rg = &plan->radiograph;
  char stored[HL_IMAGE_PATH_MAX];
  int source = HL_SPACING_NONE;
  hl_radiograph_init (rg);
  if (!get_text_attr (r, node, "path", stored, sizeof stored))
    return false;
  xmlChar *hex = xmlGetNoNsProp (node, (const xmlChar *) "sha256");
  if (hex != NULL)
    {
      snprintf (rg->sha256, sizeof rg->sha256, "%s", (const char *) hex);
      xmlFree (hex);
    }
  if (!get_number (r, node, "pixel-spacing-mm", false, &rg->pixel_spacing_mm)
      || !get_number (r, node, "origin-x-mm", false, &rg->origin_mm.x)
      || !get_number (r, node, "origin-y-mm", false, &rg->origin_mm.y)
      || !get_number (r, node, "brightness", false, &rg->brightness)
      || !get_number (r, node, "contrast", false, &rg->contrast)
      || !get_number (r, node, "window-centre", false, &rg->window_centre)
      || !get_number (r, node, "window-width", false, &rg->window_width)
      || !get_enum (r, node, "spacing-source", false, &source)
      || !get_bool (r, node, "invert", &rg->invert)
      || !get_number (r, node, "opacity", false, &rg->opacity)
      || !get_bool (r, node, "schematic-visible", &rg->schematic_visible))
    return false;
  rg->spacing_source = (HlSpacingSource) source;
  HlError resolve;
  hl_error_clear (&resolve);
  if (hl_image_resolve_path (r->base_file, stored, rg->path, sizeof rg->path, &resolve)
      != HL_OK)
    {
      reader_fail (r, HL_ERR_PARSE, node, "%s", resolve.message);
      return false;
    }
  rg->present = true;
  return true;
}

static bool
read_aids (HlReader *r, xmlNodePtr node, HlPlan *plan, HlPlanNodes *nodes)
{
  for (xmlNodePtr c = node->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      if (node_is (c, "cane"))
        {
          HlCane *cane = &plan->cane;
          int hand = (int) cane->hand;
          int unit = (int) cane->unit;
          nodes->cane = c;
          if (!get_bool (r, c, "enabled", &cane->enabled)
              || !get_enum (r, c, "hand", false, &hand)
              || !get_enum (r, c, "unit", false, &unit)
              || !get_number (r, c, "value", false, &cane->value)
              || !get_number (r, c, "distance-mm", false, &cane->distance_mm))
            return false;
          cane->hand = (HlHand) hand;
          cane->unit = (HlForceUnit) unit;
        }
      else if (node_is (c, "hand-load"))
        {
          int hand = 0;
          if (!get_enum (r, c, "hand", true, &hand))
            return false;
          if (nodes->hand_load[hand] != NULL)
            {
              reader_fail (r, HL_ERR_PARSE, c, _("the load in this hand is given twice"));
              return false;
            }
          nodes->hand_load[hand] = c;
          HlHandLoad *load = &plan->loads.hand[hand];
          if (!get_number (r, c, "mass-kg", false, &load->mass_kg)
              || !get_number (r, c, "distance-mm", false, &load->distance_mm))
            return false;
        }
      else if (node_is (c, "midline-load"))
        {
          nodes->midline_load = c;
          if (!get_number (r, c, "mass-kg", false, &plan->loads.midline_kg))
            return false;
        }
      else
        {
          reader_fail (r, HL_ERR_PARSE, c, _("unexpected element in <aids>"));
          return false;
        }
    }
  return true;
}

/* The <template> child of an <option>, when there is one: read as it
 * stands, unresolved (hl_plan_resolve_templates looks it up). */
static bool
read_template (HlReader *r, xmlNodePtr option, HlTemplate *t)
{
  for (xmlNodePtr c = option->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      if (!node_is (c, "template") || t->on)
        {
          reader_fail (r, HL_ERR_PARSE, c, _("unexpected element in <option>"));
          return false;
        }
      t->on = true;
      if (!get_text_attr (r, c, "catalogue", t->catalogue, sizeof t->catalogue)
          || !get_text_attr (r, c, "cup-family", t->cup_family, sizeof t->cup_family)
          || !get_number (r, c, "cup-diameter-mm", true, &t->cup_diameter_mm)
          || !get_number (r, c, "cup-x-mm", true, &t->cup_x_mm)
          || !get_number (r, c, "cup-y-mm", true, &t->cup_y_mm)
          || !get_number (r, c, "inclination-deg", true, &t->inclination_deg)
          || !get_text_attr (r, c, "liner", t->liner, sizeof t->liner)
          || !get_text_attr (r, c, "stem-family", t->stem_family, sizeof t->stem_family)
          || !get_text_attr (r, c, "stem-size", t->stem_size, sizeof t->stem_size)
          || !get_text_attr (r, c, "version", t->version, sizeof t->version)
          || !get_number (r, c, "seat-mm", true, &t->seat_mm)
          || !get_number (r, c, "head-length-mm", true, &t->head_length_mm))
        return false;
    }
  return true;
}

static bool
read_catalogue_refs (HlReader *r, xmlNodePtr node, HlPlan *plan)
{
  for (xmlNodePtr c = node->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      if (!node_is (c, "catalogue") || plan->n_catalogues >= HL_PLAN_CATALOGUES_MAX)
        {
          reader_fail (r, HL_ERR_PARSE, c, node_is (c, "catalogue")
                       ? _("a plan records at most 8 implant catalogues")
                       : _("unexpected element in <catalogues>"));
          return false;
        }
      HlCatalogueRef *ref = &plan->catalogues[plan->n_catalogues];
      if (!get_text_attr (r, c, "id", ref->id, sizeof ref->id)
          || !get_text_attr (r, c, "version", ref->version, sizeof ref->version)
          || !get_text_attr (r, c, "sha256", ref->sha256, sizeof ref->sha256))
        return false;
      plan->n_catalogues++;
    }
  return true;
}

static bool
read_options (HlReader *r, xmlNodePtr node, HlPlan *plan, HlPlanNodes *nodes)
{
  for (xmlNodePtr c = node->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      if (!node_is (c, "option"))
        {
          reader_fail (r, HL_ERR_PARSE, c, _("unexpected element in <options>"));
          return false;
        }
      if (plan->n_options >= HL_PLAN_MAX_OPTIONS)
        {
          reader_fail (r, HL_ERR_PARSE, c, _("this is option %zu; a plan holds at most %d "
                                             "options"), plan->n_options + 1,
                       HL_PLAN_MAX_OPTIONS);
          return false;
        }
      HlOption option;
      memset (&option, 0, sizeof option);
      hl_recon_init (&option.recon);
      HlRecon *rc = &option.recon;
      char unsafe[96];
      if (!get_text_attr (r, c, "name", option.name, sizeof option.name))
        return false;
      if (hl_text_unsafe (option.name, unsafe, sizeof unsafe) != NULL)
        {
          reader_fail (r, HL_ERR_PARSE, c, _("the option name holds %s; names must be "
                                             "one line of plain text"), unsafe);
          return false;
        }
      for (size_t j = 0; j < plan->n_options && j < nodes->n_option; j++)
        if (strcmp (plan->options[j].name, option.name) == 0)
          {
            reader_fail (r, HL_ERR_PARSE, c,
                         _("the option name \"%s\" is used twice, on line %d and on "
                           "line %d; each option needs its own name"),
                         option.name, node_line (nodes->option[j]), node_line (c));
            return false;
          }
      if (!get_number (r, c, "cup-medial-mm", false, &rc->cup_medial_mm)
          || !get_number (r, c, "cup-superior-mm", false, &rc->cup_superior_mm)
          || !get_number (r, c, "femoral-offset-mm", false, &rc->femoral_offset_mm)
          || !get_number (r, c, "femoral-length-mm", false, &rc->femoral_length_mm)
          || !get_number (r, c, "head-length-mm", false, &rc->head_length_mm)
          || !get_number (r, c, "neck-shaft-angle-deg", false, &rc->neck_shaft_angle_deg)
          || !read_template (r, c, &rc->tmpl))
        return false;

      xmlNodePtr *grown = realloc (nodes->option, (nodes->n_option + 1) * sizeof *grown);
      if (grown == NULL || hl_plan_add_option (plan, option.name, rc) < 0)
        {
          if (grown != NULL)
            nodes->option = grown;
          reader_fail (r, HL_ERR_NOMEM, c, _("out of memory"));
          return false;
        }
      nodes->option = grown;
      nodes->option[nodes->n_option++] = c;
    }
  return true;
}

/* A whole number attribute; the schema has checked its form and range
 * (samples: positive, seed: unsigned 64-bit). */
static bool
get_count (HlReader *r, xmlNodePtr node, const char *attr, uint64_t *out)
{
  xmlChar *v = xmlGetNoNsProp (node, (const xmlChar *) attr);
  if (v == NULL)
    return true;
  const char *t = (const char *) v;
  while (is_xml_space (*t))
    t++;
  if (*t == '+')
    t++;
  char *end = NULL;
  errno = 0;
  unsigned long long n = is_digit (*t) ? strtoull (t, &end, 10) : 0;
  bool ok = end != NULL && errno == 0;
  while (ok && is_xml_space (*end))
    end++;
  ok = ok && *end == '\0';
  if (ok)
    *out = (uint64_t) n;
  else
    reader_fail (r, HL_ERR_PARSE, node, _("attribute %s is '%.*s', not a whole number"),
                 attr, HL_QUOTE (v));
  xmlFree (v);
  return ok;
}

static bool
read_uncertainty (HlReader *r, xmlNodePtr node, HlPlan *plan)
{
  HlMcSettings *mc = &plan->uncertainty;
  uint64_t samples = mc->n_samples;

  if (!get_count (r, node, "samples", &samples) || !get_count (r, node, "seed", &mc->seed))
    return false;
  mc->n_samples = samples > SIZE_MAX ? SIZE_MAX : (size_t) samples;
  return get_number (r, node, "landmark-sd-mm", false, &mc->landmark_sd_mm)
         && get_number (r, node, "magnification-sd", false, &mc->magnification_sd)
         && get_number (r, node, "angle-sd-deg", false, &mc->line_angle_sd_deg);
}

static bool
read_plan_element (HlReader *r, xmlNodePtr node, HlPlan *plan, HlPlanNodes *nodes)
{
  nodes->plan = node;
  bool have_case = false, have_landmarks = false;

  for (xmlNodePtr c = node->children; c != NULL && r->x.status == HL_OK; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      bool ok;
      if (node_is (c, "case"))
        ok = read_case (r, c, plan), have_case = true, nodes->case_ = c;
      else if (node_is (c, "model"))
        ok = read_model (r, c, plan), nodes->model = c;
      else if (node_is (c, "landmarks"))
        ok = read_landmarks (r, c, plan, nodes), have_landmarks = true, nodes->landmarks = c;
      else if (node_is (c, "calibration"))
        ok = read_calibration (r, c, plan), nodes->calibration = c;
      else if (node_is (c, "radiograph"))
        ok = read_radiograph (r, c, plan), nodes->radiograph = c;
      else if (node_is (c, "aids"))
        ok = read_aids (r, c, plan, nodes);
      else if (node_is (c, "tolerances"))
        {
          nodes->tolerances = c;
          ok = get_number (r, c, "global-offset-drop-mm", false, &plan->tol.global_offset_drop_mm)
               && get_number (r, c, "leg-length-mm", false, &plan->tol.leg_length_mm)
               && get_number (r, c, "abductor-slack-mm", false, &plan->tol.abductor_slack_mm);
        }
      else if (node_is (c, "capacity"))
        {
          nodes->capacity = c;
          ok = get_number (r, c, "torque-nm-per-kg", false, &plan->capacity.torque_nm_per_kg);
        }
      else if (node_is (c, "uncertainty"))
        ok = read_uncertainty (r, c, plan), nodes->uncertainty = c;
      else if (node_is (c, "options"))
        ok = read_options (r, c, plan, nodes);
      else if (node_is (c, "catalogues"))
        ok = read_catalogue_refs (r, c, plan);
      else if (node_is (c, "notes"))
        {
          xmlChar *text = xmlNodeGetContent (c);
          ok = copy_text (r, c, _("the notes"), text ? (const char *) text : "",
                          plan->notes, sizeof plan->notes);
          xmlFree (text);
        }
      else
        {
          reader_fail (r, HL_ERR_PARSE, c, _("unexpected element in <plan>"));
          ok = false;
        }
      if (!ok)
        return false;
    }
  if (!have_case)
    reader_fail (r, HL_ERR_PARSE, node, _("the <case> element is missing"));
  else if (!have_landmarks)
    reader_fail (r, HL_ERR_PARSE, node, _("the <landmarks> element is missing"));
  return r->x.status == HL_OK;
}

/* The element a failed range check is about, from its field name. */
static xmlNodePtr
node_for_field (const HlPlanNodes *nodes, const HlPlan *plan, const char *field)
{
  static const char option_prefix[] = "option \"";
  if (strncmp (field, option_prefix, sizeof option_prefix - 1) == 0)
    {
      const char *name = field + sizeof option_prefix - 1;
      for (size_t i = 0; i < plan->n_options && i < nodes->n_option; i++)
        {
          size_t len = strlen (plan->options[i].name);
          if (strncmp (name, plan->options[i].name, len) == 0 && name[len] == '"')
            return nodes->option[i];
        }
      return nodes->plan;
    }
  if (strncmp (field, "landmark ", 9) == 0)
    {
      HlLandmarkId id = hl_landmark_from_key (field + 9);
      return id < HL_LM_COUNT && nodes->landmark[id] ? nodes->landmark[id] : nodes->landmarks;
    }
  for (int i = 0; i < HL_LM_COUNT; i++)
    if (strcmp (field, hl_landmark_info ((HlLandmarkId) i)->key) == 0)
      return nodes->landmarks;

  const struct { const char *prefix; xmlNodePtr node; } map[] = {
    { "patient", nodes->case_ },
    { "operated", nodes->case_ },
    { "model", nodes->model },
    { "calibration", nodes->calibration },
    { "radiograph", nodes->radiograph },
    { "cane", nodes->cane },
    { "load contralateral", nodes->hand_load[HL_HAND_CONTRALATERAL] },
    { "load ipsilateral", nodes->hand_load[HL_HAND_IPSILATERAL] },
    { "load midline", nodes->midline_load },
    { "tolerance", nodes->tolerances },
    { "capacity", nodes->capacity },
    { "uncertainty", nodes->uncertainty },
  };
  for (size_t i = 0; i < sizeof map / sizeof map[0]; i++)
    if (strncmp (field, map[i].prefix, strlen (map[i].prefix)) == 0)
      return map[i].node ? map[i].node : nodes->plan;
  return nodes->plan;
}

/* ---- Loading ----------------------------------------------------------- */

static HlStatus
check_format_version (HlReader *r, xmlNodePtr node)
{
  xmlChar *v = xmlGetNoNsProp (node, (const xmlChar *) "format-version");
  if (v == NULL)
    return reader_fail (r, HL_ERR_PARSE, node, _("attribute format-version is missing"));

  const char *s = (const char *) v;
  long version = 0;
  bool digits = *s != '\0';
  for (const char *p = s; *p != '\0'; p++)
    {
      if (!is_digit (*p) || version > INT_MAX / 10)
        {
          digits = false;
          break;
        }
      version = version * 10 + (*p - '0');
    }
  HlStatus st = HL_OK;
  if (!digits || version < 1)
    st = reader_fail (r, HL_ERR_PARSE, node,
                      _("attribute format-version is '%.*s', not a format version number"),
                      HL_QUOTE (s));
  else if (version > HL_PLAN_FORMAT_VERSION)
    st = reader_fail (r, HL_ERR_VERSION, node,
                      _("the file has format version %ld, newer than this program "
                        "understands (version %d); open it with a newer hiplever"),
                      version, HL_PLAN_FORMAT_VERSION);
  xmlFree (v);
  return st;
}

static HlStatus
check_root (HlReader *r, xmlNodePtr root, bool *is_summary)
{
  if (root == NULL)
    return reader_fail_at (r, HL_ERR_PARSE, 0, NULL, _("the file has no root element"));
  if (root->ns == NULL)
    return reader_fail (r, HL_ERR_PARSE, root,
                        _("the element has no namespace, not \"%s\": this is not a "
                          "hiplever plan"), HL_PLAN_NAMESPACE);
  if (xmlStrcmp (root->ns->href, (const xmlChar *) HL_PLAN_NAMESPACE) != 0)
    return reader_fail (r, HL_ERR_PARSE, root,
                        _("the namespace is \"%.*s\", not \"%s\": this is not a "
                          "hiplever plan"), HL_QUOTED_VALUE_MAX,
                        (const char *) root->ns->href, HL_PLAN_NAMESPACE);
  if (node_is (root, "planning-summary"))
    *is_summary = true;
  else if (node_is (root, "plan"))
    *is_summary = false;
  else
    return reader_fail (r, HL_ERR_PARSE, root,
                        _("the root element is <%.*s>, not <plan> or "
                          "<planning-summary>: this is not a hiplever plan"),
                        HL_QUOTE (root->name));
  return check_format_version (r, root);
}

static HlXmlSchema plan_schema = HL_XML_SCHEMA_INIT (hl_schema_data, hl_schema_data_len);

static const HlXmlKind plan_kind = {
  .doc_name = "plan",
  .ns = HL_PLAN_NAMESPACE,
  .max_bytes = HL_PLAN_MAX_BYTES,
  .too_big = N_("the file is %zu bytes, more than the %u bytes a plan may have"),
  .doctype = N_("the file has a document type declaration; plan files never have one, "
                "so it is refused and nothing it declares or points to is read"),
  .no_match = N_("the file does not match the plan schema"),
  .schema_broken = N_("internal error: the built-in plan schema does not compile"),
  .is_folder = N_("\"%s\" is a folder, not a plan file"),
  .file_too_big = N_("\"%s\" is %jd bytes, more than the %u bytes a plan file may have"),
  .file_grew = N_("\"%s\" is more than the %u bytes a plan file may have"),
};

static HlStatus
validate_schema (HlReader *r, xmlDocPtr doc)
{
  HlStatus st = hl_xml_validate (&r->x, &plan_schema, doc);
  if (st != HL_ERR_PARSE || r->x.status != HL_OK)
    return st;

  if (r->x.xml_node != NULL && diagnose_element (r, r->x.xml_node))
    return r->x.status;

  char element[HL_ERROR_FIELD_MAX] = "";
  describe_element (r->x.xml_node, element, sizeof element);
  return reader_fail_at (r, HL_ERR_PARSE, r->x.xml_line, element, "%s",
                         hl_xml_schema_message (&r->x));
}

/* Before the schema: a plan without its case or its required landmarks
 * gets a message in plain words, not the schema's. */
#define HL_LEAST_LANDMARKS \
  N_("place at least the hip centre, the midline and the abductor insertion")

static HlStatus
check_plan_outline (HlReader *r, xmlNodePtr plan_node)
{
  xmlNodePtr case_node = NULL, landmarks = NULL;
  for (xmlNodePtr c = plan_node->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE)
        continue;
      if (case_node == NULL && node_is (c, "case"))
        case_node = c;
      else if (landmarks == NULL && node_is (c, "landmarks"))
        landmarks = c;
    }
  if (case_node == NULL)
    return reader_fail (r, HL_ERR_PARSE, plan_node,
                        _("the plan has no case: give the case label, the body "
                          "mass and the operated side (a <case> element)"));
  if (landmarks == NULL)
    return reader_fail (r, HL_ERR_PARSE, plan_node,
                        _("the plan has no landmarks: %s"), _(HL_LEAST_LANDMARKS));

  bool placed[HL_LM_COUNT] = { false };
  int n_placed = 0;
  for (xmlNodePtr c = landmarks->children; c != NULL; c = c->next)
    {
      if (c->type != XML_ELEMENT_NODE || !node_is (c, "landmark"))
        continue;
      xmlChar *key = xmlGetNoNsProp (c, (const xmlChar *) "name");
      HlLandmarkId id = hl_landmark_from_key (key ? (const char *) key : "");
      xmlFree (key);
      n_placed++;
      if (id != HL_LM_COUNT)
        placed[id] = true;
    }
  if (n_placed == 0)
    return reader_fail (r, HL_ERR_PARSE, landmarks,
                        _("the plan has no landmarks: %s"), _(HL_LEAST_LANDMARKS));

  char missing[256] = "";
  size_t used = 0;
  int n_missing = 0;
  for (int i = 0; i < HL_LM_COUNT; i++)
    {
      const HlLandmarkInfo *info = hl_landmark_info ((HlLandmarkId) i);
      if (!info->required || placed[i])
        continue;
      int n = snprintf (missing + used, sizeof missing - used, "%s%s (%s)",
                        n_missing ? ", " : "", _(info->label), info->key);
      if (n > 0 && (size_t) n < sizeof missing - used)
        used += (size_t) n;
      n_missing++;
    }
  if (n_missing > 0)
    return reader_fail (r, HL_ERR_PARSE, landmarks,
                        ngettext ("the plan lacks the required landmark %s: %s",
                                  "the plan lacks the required landmarks %s: %s",
                                  (unsigned long) n_missing),
                        missing, _(HL_LEAST_LANDMARKS));
  return HL_OK;
}

/* Everything after the bytes are in memory; called with the thread's
 * libxml2's error output redirected. */
static HlStatus
load_document (HlReader *r, const char *data, size_t size, HlPlan **out)
{
  xmlDocPtr doc = NULL;
  HlStatus st = hl_xml_parse (&r->x, data, size, &doc);
  if (st != HL_OK)
    return st;

  bool is_summary = false;
  xmlNodePtr root = xmlDocGetRootElement (doc);
  xmlNodePtr outline = root;
  if ((st = check_root (r, root, &is_summary)) == HL_OK && is_summary)
    for (outline = root->children; outline != NULL; outline = outline->next)
      if (outline->type == XML_ELEMENT_NODE && node_is (outline, "plan"))
        break;
  if (st != HL_OK
      || (outline != NULL && (st = check_plan_outline (r, outline)) != HL_OK)
      || (st = validate_schema (r, doc)) != HL_OK)
    {
      xmlFreeDoc (doc);
      return st;
    }

  xmlNodePtr plan_node = root;
  if (is_summary)
    {
      plan_node = NULL;
      for (xmlNodePtr c = root->children; c != NULL && plan_node == NULL; c = c->next)
        if (node_is (c, "plan"))
          plan_node = c;
      if (plan_node == NULL)
        st = reader_fail (r, HL_ERR_PARSE, root, _("the summary holds no <plan> element"));
      else
        st = check_format_version (r, plan_node);
    }

  HlPlan *plan = NULL;
  HlPlanNodes nodes;
  memset (&nodes, 0, sizeof nodes);
  if (st == HL_OK)
    {
      plan = hl_plan_new ();
      if (plan == NULL)
        st = reader_fail_at (r, HL_ERR_NOMEM, 0, NULL, _("out of memory"));
      else
        memset (&plan->landmarks, 0, sizeof plan->landmarks);
    }
  if (st == HL_OK && !read_plan_element (r, plan_node, plan, &nodes))
    st = r->x.status;

  if (st == HL_OK)
    {
      HlError check;
      hl_error_clear (&check);
      st = hl_plan_check (plan, &check);
      if (st != HL_OK)
        {
          xmlNodePtr node = node_for_field (&nodes, plan, check.field);
          char element[HL_ERROR_FIELD_MAX];
          describe_element (node, element, sizeof element);
          reader_fail_at (r, st, node_line (node), element, "%s", check.message);
          if (r->x.err != NULL)
            snprintf (r->x.err->field, sizeof r->x.err->field, "%s", check.field);
        }
    }

  free (nodes.option);
  xmlFreeDoc (doc);
  if (st != HL_OK)
    {
      hl_plan_free (plan);
      return st;
    }
  *out = plan;
  return HL_OK;
}

/* Plans are UTF-8: the writer never writes anything else.  A UTF-16 or
 * UTF-32 file (with a byte-order mark, or a NUL among its first bytes, as
 * "<" has in those encodings) is refused before any parsing. */
static bool
is_wide_encoding (const unsigned char *d, size_t n)
{
  if (n >= 2 && ((d[0] == 0xFF && d[1] == 0xFE) || (d[0] == 0xFE && d[1] == 0xFF)))
    return true;
  return n >= 2 && (d[0] == 0x00 || d[1] == 0x00);
}

static HlStatus
load_buffer_for (const char *data, size_t size, const char *name_for_errors,
                 const char *base_file, HlPlan **out, HlError *err)
{
  hl_error_clear (err);
  if (is_wide_encoding ((const unsigned char *) data, size))
    return hl_error_set (err, HL_ERR_PARSE, name_for_errors ? name_for_errors : "",
                         _("%s: the file is in a UTF-16 or UTF-32 encoding; plan files "
                           "are UTF-8: save it again with UTF-8 encoding"),
                         name_for_errors ? name_for_errors : _("the plan"));

  HlReader r;
  memset (&r, 0, sizeof r);
  r.base_file = base_file;
  hl_xml_load_begin (&r.x, &plan_kind, name_for_errors, err);
  HlStatus st = load_document (&r, data, size, out);
  hl_xml_load_end (&r.x);
  return st;
}

HlStatus
hl_plan_load_buffer (const char *data, size_t size, const char *name_for_errors,
                     HlPlan **out, HlError *err)
{
  return load_buffer_for (data, size, name_for_errors, NULL, out, err);
}

HlStatus
hl_plan_load_file (const char *path, HlPlan **out, HlError *err)
{
  hl_error_clear (err);
  char *data = NULL;
  size_t len = 0;
  HlStatus st = hl_xml_read_file (&plan_kind, path, &data, &len, err);
  if (st == HL_OK)
    st = load_buffer_for (data, len, path, path, out, err);
  free (data);
  return st;
}
