/* hl-cli-calibrate.c: magnification from a plan's calibration or from
 * points typed on the command line; the measures block of solve.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 *   hiplever-cli calibrate PLAN
 *   hiplever-cli calibrate --marker X1,Y1 X2,Y2 X3,Y3 [--diameter 25]
 *   hiplever-cli calibrate --two-point X1,Y1 X2,Y2 --distance D
 *
 * Points are image mm (measured on the radiograph, not yet corrected).
 */
#include "config.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hl-cli-calibrate.h"
#include "hl-deadline.h"
#include "hl-i18n.h"
#include "hl-image.h"
#include "hl-measure.h"
#include "hl-plan-io.h"
#include "hl-solve.h"

enum { CAL_OPT_MARKER, CAL_OPT_TWO_POINT, CAL_OPT_DIAMETER, CAL_OPT_DISTANCE };

const HlCliOption hl_cli_calibrate_options[] = {
  [CAL_OPT_MARKER] = { "marker", 0, N_("X1,Y1 X2,Y2 X3,Y3"),
    N_("three points on the edge of a calibration marker, image mm") },
  [CAL_OPT_TWO_POINT] = { "two-point", 0, N_("X1,Y1 X2,Y2"),
    N_("two points a known distance apart, image mm") },
  [CAL_OPT_DIAMETER] = { "diameter", 0, N_("MM"),
    N_("the marker's true diameter (default 25 mm, common practice)") },
  [CAL_OPT_DISTANCE] = { "distance", 0, N_("MM"),
    N_("the true distance between the two points") },
  { NULL },
};

#define HL_CLI_MAGNIFICATION_DECIMALS HL_DECIMALS_MAGNIFICATION
#define HL_CLI_MEASURE_DECIMALS 1

static bool
parse_double (const char *s, double *out)
{
  char *end;
  errno = 0;
  double v = strtod (s, &end);
  if (end == s || *end != '\0' || errno == ERANGE || !isfinite (v))
    return false;
  *out = v;
  return true;
}

static bool
parse_point (const char *s, HlVec2 *p)
{
  const char *comma = strchr (s, ',');
  if (comma == NULL || comma == s || comma[1] == '\0' || comma - s >= 63)
    return false;
  char x[64];
  memcpy (x, s, (size_t) (comma - s));
  x[comma - s] = '\0';
  return parse_double (x, &p->x) && parse_double (comma + 1, &p->y);
}

static const char *
method_words (HlCalMethod method)
{
  switch (method)
    {
    case HL_CAL_TYPED:
      return _("typed magnification");
    case HL_CAL_MARKER:
      return _("marker of known diameter");
    case HL_CAL_TWO_POINT:
      return _("two points a known distance apart");
    case HL_CAL_ASSUMED:
    default:
      return _("none");
    }
}

static int
report (const char *where, const HlCalibration *cal)
{
  HlError err;
  double m;
  bool assumed;

  hl_error_clear (&err);
  if (hl_calibration_magnification (cal, &m, &assumed, &err) != HL_OK)
    {
      hl_cli_report_error (where, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  fprintf (stdout, _("Calibration method: %s\n"), method_words (cal->method));
  if (cal->method == HL_CAL_MARKER)
    fprintf (stdout, _("Marker diameter: %.1f mm; %d points\n"),
             cal->marker_diameter_mm, cal->n_points);
  else if (cal->method == HL_CAL_TWO_POINT)
    fprintf (stdout, _("Known distance: %.1f mm; %d points\n"),
             cal->known_distance_mm, cal->n_points);
  fprintf (stdout, _("Magnification: %.*f (measured / true)\n"),
           HL_CLI_MAGNIFICATION_DECIMALS, m);
  if (assumed)
    fprintf (stdout, "%s\n",
             _("Assumed, not calibrated: the mean AP pelvis magnification "
               "of Brew et al. 2012 (J Arthroplasty 27:643-647), range "
               "1.17-1.234"));
  else
    fprintf (stdout, "%s\n", _("Calibrated: not assumed"));
  return HL_CLI_EXIT_OK;
}

int
hl_cli_calibrate (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *marker = args->value[CAL_OPT_MARKER];
  const char *two = args->value[CAL_OPT_TWO_POINT];
  HlCalibration cal;

  memset (&cal, 0, sizeof cal);
  if (marker == NULL && two == NULL)
    {
      if (args->n_operands != 1)
        return hl_cli_usage_error (_("%s: give one PLAN, or --marker or --two-point "
                                     "with the points"), cmd->name);
      if (args->value[CAL_OPT_DIAMETER] != NULL || args->value[CAL_OPT_DISTANCE] != NULL)
        return hl_cli_usage_error (_("%s: --diameter and --distance go with --marker "
                                     "and --two-point; a plan has its own"), cmd->name);
      const char *path = args->operands[0];
      HlPlan *plan = NULL;
      HlError err;
      hl_error_clear (&err);
      if (hl_plan_load_file (path, &plan, &err) != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          return HL_CLI_EXIT_INVALID;
        }
      hl_cli_check_radiograph (path, plan);
      fprintf (stdout, _("Plan: %s\n"), path);
      int status = report (path, &plan->calibration);
      hl_plan_free (plan);
      return status;
    }
  if (marker != NULL && two != NULL)
    return hl_cli_usage_error (_("%s: --marker and --two-point exclude each other"),
                               cmd->name);

  const char *first = marker != NULL ? marker : two;
  int need = marker != NULL ? 3 : 2;
  const char *opt = marker != NULL ? "--marker" : "--two-point";
  if (1 + args->n_operands != need)
    return hl_cli_usage_error (_("%s: %s takes %d points X,Y (image mm); %d given"),
                               cmd->name, opt, need, 1 + args->n_operands);
  for (int i = 0; i < need; i++)
    {
      const char *text = i == 0 ? first : args->operands[i - 1];
      if (!parse_point (text, &cal.points[i]))
        return hl_cli_usage_error (_("%s: point %d of %s is '%s', not two numbers "
                                     "X,Y in mm"), cmd->name, i + 1, opt, text);
    }
  cal.n_points = need;
  cal.magnification = HL_MAGNIFICATION_ASSUMED;
  if (marker != NULL)
    {
      const char *d = args->value[CAL_OPT_DIAMETER];
      if (args->value[CAL_OPT_DISTANCE] != NULL)
        return hl_cli_usage_error (_("%s: --distance goes with --two-point"), cmd->name);
      cal.method = HL_CAL_MARKER;
      cal.marker_diameter_mm = HL_MARKER_DIAMETER_DEFAULT;
      if (d != NULL && !parse_double (d, &cal.marker_diameter_mm))
        return hl_cli_usage_error (_("%s: --diameter '%s' is not a number of mm"),
                                   cmd->name, d);
    }
  else
    {
      const char *d = args->value[CAL_OPT_DISTANCE];
      if (args->value[CAL_OPT_DIAMETER] != NULL)
        return hl_cli_usage_error (_("%s: --diameter goes with --marker"), cmd->name);
      if (d == NULL)
        return hl_cli_usage_error (_("%s: --two-point needs --distance MM, the true "
                                     "distance"), cmd->name);
      cal.method = HL_CAL_TWO_POINT;
      if (!parse_double (d, &cal.known_distance_mm))
        return hl_cli_usage_error (_("%s: --distance '%s' is not a number of mm"),
                                   cmd->name, d);
    }
  return report (opt, &cal);
}

/* ---- solve ---------------------------------------------------------------- */

void
hl_cli_check_radiograph (const char *plan_path, const HlPlan *plan)
{
  char message[HL_IMAGE_PATH_MAX + 128];
  /* A check cut short by a batch plan's time budget says nothing: the
   * plan fails with the budget's message. */
  if (plan->radiograph.present
      && hl_image_verify (&plan->radiograph, message, sizeof message) != HL_IMAGE_OK
      && !hl_deadline_passed ())
    hl_cli_error (_("%s: %s; the plan is used without it"), plan_path, message);
}

typedef struct {
  const char *label;   /* N_() */
  size_t offset;       /* into HlSideMeasures */
} HlCliMeasureRow;

static const HlCliMeasureRow measure_rows[] = {
  { N_("Acetabular offset"), offsetof (HlSideMeasures, acetabular_offset_mm) },
  { N_("Femoral offset"), offsetof (HlSideMeasures, femoral_offset_mm) },
  { N_("Global offset"), offsetof (HlSideMeasures, global_offset_mm) },
  { N_("Hip centre height"), offsetof (HlSideMeasures, hip_centre_height_mm) },
  { N_("Leg length"), offsetof (HlSideMeasures, leg_length_mm) },
};
#define N_MEASURE_ROWS (sizeof measure_rows / sizeof measure_rows[0])

static double
side_value (const HlSideMeasures *m, size_t row)
{
  return *(const double *) ((const char *) m + measure_rows[row].offset);
}

static double
difference_value (const HlMeasures *ms, size_t row)
{
  const double v[N_MEASURE_ROWS] = {
    ms->acetabular_offset_difference_mm, ms->femoral_offset_difference_mm,
    ms->global_offset_difference_mm, ms->hip_centre_height_difference_mm,
    ms->leg_length_difference_mm,
  };
  return v[row];
}

static const char *
cell (char *buf, size_t size, double v)
{
  if (!isfinite (v))
    return "-";
  return hl_format_number (buf, size, HL_CLI_MEASURE_DECIMALS, v);
}

#define HL_CLI_MEASURE_GAP 2
#define HL_CLI_MEASURE_MIN_WIDTH 8

void
hl_cli_print_against_other (const HlPlan *plan)
{
  size_t n_cases = plan->n_options + 1;
  bool header = false;
  for (size_t i = 0; i < n_cases; i++)
    {
      HlMeasures ms;
      hl_row_measures (plan, i, &ms);
      if (!isfinite (ms.leg_length_difference_mm) && !isfinite (ms.global_offset_difference_mm))
        continue;
      if (!header)
        fprintf (stdout, "\n%s\n", _("Against the other hip:"));
      header = true;
      char leg[160], go[160];
      fprintf (stdout, "  %s: %s; %s\n",
               i == 0 ? _("native") : plan->options[i - 1].name,
               hl_measure_leg_length_words (ms.leg_length_difference_mm, leg, sizeof leg),
               hl_measure_global_offset_words (ms.global_offset_difference_mm, go,
                                               sizeof go));
    }
}

void
hl_cli_print_measures (const HlPlan *plan)
{
  size_t n_cases = plan->n_options + 1;
  HlMeasures *ms = calloc (n_cases, sizeof *ms);
  if (ms == NULL)
    {
      hl_cli_error ("%s", _("out of memory for the radiographic measures"));
      return;
    }
  bool any = false;
  for (size_t i = 0; i < n_cases; i++)
    {
      hl_row_measures (plan, i, &ms[i]);
      for (size_t r = 0; r < N_MEASURE_ROWS; r++)
        any |= isfinite (side_value (&ms[i].operated, r))
               || isfinite (side_value (&ms[i].other, r));
    }
  if (!any)
    {
      free (ms);
      return;
    }

  /* Columns: each case's operated side and its difference to the other
   * side (the target is 0), then the other side once: no option moves it. */
  size_t label_w = 0, other_w = hl_cli_text_width (_("other side"));
  size_t *col_w = calloc (n_cases, sizeof *col_w);
  char num[HL_CLI_NUMBER_MAX];
  if (col_w == NULL)
    {
      free (ms);
      hl_cli_error ("%s", _("out of memory for the radiographic measures"));
      return;
    }
  for (size_t r = 0; r < N_MEASURE_ROWS; r++)
    if (hl_cli_text_width (_(measure_rows[r].label)) > label_w)
      label_w = hl_cli_text_width (_(measure_rows[r].label));
  for (size_t i = 0; i < n_cases; i++)
    {
      const char *name = i == 0 ? _("native") : plan->options[i - 1].name;
      size_t w = hl_cli_text_width (name);
      col_w[i] = w > HL_CLI_MEASURE_MIN_WIDTH ? w : HL_CLI_MEASURE_MIN_WIDTH;
    }

  bool assumed;
  double m = hl_image_display_magnification (plan, &assumed);
  fprintf (stdout, "\n%s\n", _("Radiographic measures (mm, operated side; "
                               "\"diff\" is operated minus other side, "
                               "the target is 0):"));
  fprintf (stdout, _("Magnification %.*f%s\n"), HL_DECIMALS_MAGNIFICATION, m,
           assumed ? _(" (assumed, not calibrated)") : "");
  fprintf (stdout, "%-*s", (int) label_w, "");
  for (size_t i = 0; i < n_cases; i++)
    {
      char head[HL_NAME_MAX + 16];
      const char *name = i == 0 ? _("native") : plan->options[i - 1].name;
      snprintf (head, sizeof head, "%s", name);
      fprintf (stdout, "%*s%*s%s", HL_CLI_MEASURE_GAP, "",
               (int) (col_w[i] - hl_cli_text_width (head)), "", head);
      snprintf (head, sizeof head, "%s", _("diff"));
      fprintf (stdout, "%*s%8s", HL_CLI_MEASURE_GAP, "", head);
    }
  fprintf (stdout, "%*s%s\n", HL_CLI_MEASURE_GAP, "", _("other side"));
  for (size_t r = 0; r < N_MEASURE_ROWS; r++)
    {
      const char *label = _(measure_rows[r].label);
      fprintf (stdout, "%s%*s", label,
               (int) (label_w - hl_cli_text_width (label)), "");
      for (size_t i = 0; i < n_cases; i++)
        {
          fprintf (stdout, "%*s%*s", HL_CLI_MEASURE_GAP, "", (int) col_w[i],
                   cell (num, sizeof num, side_value (&ms[i].operated, r)));
          fprintf (stdout, "%*s%8s", HL_CLI_MEASURE_GAP, "",
                   cell (num, sizeof num, difference_value (&ms[i], r)));
        }
      fprintf (stdout, "%*s%*s\n", HL_CLI_MEASURE_GAP, "", (int) other_w,
               cell (num, sizeof num, side_value (&ms[0].other, r)));
    }
  if (ms[0].side_contradiction)
    fprintf (stdout, "%s\n",
             _("Warning: the landmarks contradict the operated side: the "
               "operated hip centre lies on the other side of the midline. "
               "Check the operated side and the landmarks."));
  free (col_w);
  free (ms);
}
