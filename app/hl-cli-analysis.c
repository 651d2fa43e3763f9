/* hl-cli-analysis.c: inverse, sweep, uncertainty, report and figure.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Rows of the subcommand table in hiplever-cli.c.  Usage errors (an
 * unknown name, a value that is not a number, a missing option) exit with
 * HL_CLI_EXIT_USAGE; values that parse but are out of range, plans that
 * cannot be solved and outputs that cannot be written exit with
 * HL_CLI_EXIT_INVALID.  Files are written atomically and only when all
 * went well, so a failure never leaves a partial file.
 */
#include "config.h"

#include <errno.h>
#include <inttypes.h>
#include <locale.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hl-analysis.h"
#include "hl-chart.h"
#include "hl-i18n.h"
#include "hl-plan.h"
#include "hl-plan-io.h"
#include "hl-render.h"
#include "hl-report.h"
#include "hl-solve.h"
#include "hl-underlay.h"
#include "hl-version.h"
#include "hl-cli.h"

/* The figure's size when --size is not given, px (SVG: pt). */
#define HL_CLI_FIGURE_WIDTH_DEFAULT 1200
#define HL_CLI_FIGURE_HEIGHT_DEFAULT 900
/* Decimals of the inverse answers in CSV: the root finder's tolerance is
 * 1e-6 in the unknown. */
#define HL_CLI_INVERSE_CSV_PRECISION 6
#define HL_CLI_PERCENT 100.0
/* Values of a sweep computed and written at a time. */
#define HL_CLI_SWEEP_BLOCK 1024

/* ---- Option tables ------------------------------------------------------ */

enum { INVERSE_OPT_TARGET, INVERSE_OPT_FORMAT };
enum { SWEEP_OPT_PARAM, SWEEP_OPT_FROM, SWEEP_OPT_TO, SWEEP_OPT_STEPS, SWEEP_OPT_CSV,
       SWEEP_OPT_MODE };
enum { MC_OPT_SAMPLES, MC_OPT_SEED, MC_OPT_CSV };
enum { REPORT_OPT_OUTPUT, REPORT_OPT_UNDERLAY, REPORT_OPT_NO_UNDERLAY };
enum { FIGURE_OPT_OUTPUT, FIGURE_OPT_SIZE, FIGURE_OPT_OPTION, FIGURE_OPT_PRESET,
       FIGURE_OPT_UNDERLAY, FIGURE_OPT_NO_UNDERLAY };

const HlCliOption hl_cli_inverse_options[] = {
  { "target-jrf", 0, N_("BW"),
    N_("the joint-load target of the cane and load questions, in multiples of "
       "body weight (default 2.0: our default, a round figure below the "
       "2.1-2.8 BW measured in static single-leg stance by Kotzar et al. 1991)") },
  { "format", 0, N_("FORMAT"),
    N_("text (the default: one sentence per answer) or csv (columns option,"
       "question,site,status,value,unit,goal,achieved,lower,upper,at_limit,"
       "range_limited,answer)") },
  { NULL },
};

const HlCliOption hl_cli_sweep_options[] = {
  { "param", 0, N_("NAME"),
    N_("the parameter (required): cup_medial_mm, cup_superior_mm, "
       "femoral_offset_mm, femoral_length_mm, head_length_mm, "
       "neck_shaft_angle_deg, cane_force_n, cane_percent_bw, load_contra_kg, "
       "load_ipsi_kg, load_midline_kg, lean_mm, mass_kg, abductor_angle_deg") },
  { "from", 0, N_("A"), N_("the first value, in the parameter's unit (required)") },
  { "to", 0, N_("B"), N_("the last value (required)") },
  { "steps", 0, N_("N"), N_("the number of values, 2 or more (required)") },
  { "csv", 0, NULL,
    N_("CSV instead of the text table; header param,value,option,"
       "abductor_arm_mm,bw_arm_mm,lever_ratio,abductor_force_N,"
       "abductor_force_BW,jrf_N,jrf_BW,jrf_angle_deg,global_offset_change_mm,"
       "leg_length_change_mm,abductor_length_change_mm,flags (the columns of "
       "solve's CSV), then for each value native and every option") },
  { "mode", 0, N_("add|set"),
    N_("for a reconstruction parameter: set (the default) replaces each "
       "option's own setting with the value; add adds the value to each "
       "option's own setting (from -5 to 5 around what each option plans)") },
  { NULL },
};

const HlCliOption hl_cli_uncertainty_options[] = {
  { "samples", 0, N_("N"),
    N_("the number of samples (default: the plan's, normally 4000; at most 10,000,000, "
       "and samples times native and the options at most 20,000,000)") },
  { "seed", 0, N_("S"),
    N_("the seed, a whole number (default: the plan's); the same seed gives "
       "the same numbers with the same GSL version") },
  { "csv", 0, NULL,
    N_("CSV: option,abductor_force_BW_p05,abductor_force_BW_p50,"
       "abductor_force_BW_p95,jrf_BW_p05,jrf_BW_p50,jrf_BW_p95,jrf_N_p05,"
       "jrf_N_p50,jrf_N_p95,share_lower_jrf_than_native") },
  { NULL },
};

const HlCliOption hl_cli_report_options[] = {
  { "output", 'o', N_("OUT.pdf"),
    N_("where to write the report (required; written atomically; not - : "
       "a PDF is not written to standard output)") },
  { "underlay", 0, NULL,
    N_("the radiograph under the schematic, with the plan's window and "
       "calibration (the default when the plan has one); a missing or "
       "changed image is left out with a message") },
  { "no-underlay", 0, NULL, N_("the schematic without the radiograph") },
  { NULL },
};

const HlCliOption hl_cli_figure_options[] = {
  { "output", 'o', N_("OUT.svg|OUT.png"),
    N_("where to write the figure (required); the format follows the "
       "extension (not - : a figure is not written to standard output)") },
  { "size", 0, N_("WxH"),
    N_("width and height in px (SVG: pt), 300 to 8192 each (default 1200x900; below 300 the labels, legend and caution no longer fit)") },
  { "option", 0, N_("N"),
    N_("the option drawn over the native hip: 1 for the first, 0 for the "
       "native hip alone (default: 1 when the plan has options, else 0)") },
  { "preset", 0, N_("slide|half-slide"),
    N_("slide: a 16:9 slide, 1920x1080, body text at least 24 px; half-slide: "
       "half of one, 960x1080, the same text (instead of --size)") },
  { "underlay", 0, NULL,
    N_("the radiograph under the drawing, with the plan's window and "
       "calibration (the default when the plan has one); a missing or "
       "changed image is left out with a message") },
  { "no-underlay", 0, NULL, N_("the drawing without the radiograph") },
  { NULL },
};

/* ---- Shared helpers ------------------------------------------------------ */

/* A number with a point, the whole text (GLib's locale-independent
 * conversion). */
static bool
parse_double (const char *text, double *out)
{
  char *end = NULL;
  errno = 0;
  double v = g_ascii_strtod (text, &end);
  bool ok = end != text && *end == '\0' && errno == 0;
  if (ok)
    *out = v;
  return ok;
}

static bool
parse_u64 (const char *text, uint64_t *out)
{
  char *end = NULL;
  if (text[0] < '0' || text[0] > '9')
    return false;
  errno = 0;
  unsigned long long v = strtoull (text, &end, 10);
  if (end == text || *end != '\0' || errno != 0)
    return false;
  *out = (uint64_t) v;
  return true;
}

static bool
prepare (const char *path, const HlPlan *plan, HlModel *model)
{
  HlError err;

  hl_error_clear (&err);
  if (hl_model_prepare (model, plan, &err) != HL_OK)
    {
      hl_cli_report_error (path, NULL, &err);
      return false;
    }
  return true;
}

static const char *
case_name (const HlPlan *plan, size_t row)
{
  return row == 0 ? "native" : plan->options[row - 1].name;
}

/* Row `row`'s name in the text tables: "native" translated (the CSV keeps
 * case_name's "native", its contract). */
static const char *
text_case_name (const HlPlan *plan, size_t row)
{
  return row == 0 ? _("native") : plan->options[row - 1].name;
}

static int
write_stdout (const char *path, const GString *buf)
{
  (void) path;
  fwrite (buf->str, 1, buf->len, stdout);
  return HL_CLI_EXIT_OK;
}

static void
buf_number (GString *buf, int precision, double v)
{
  char num[HL_CLI_NUMBER_MAX];
  if (isfinite (v))
    g_string_append_printf (buf, ",%s", hl_format_number (num, sizeof num, precision, v));
  else
    g_string_append_printf (buf, ",nan");
}

/* ---- inverse -------------------------------------------------------------- */

typedef struct {
  HlInverseKind kind;
  HlLoadSite site;
  const char *key;
  bool options_only;
} HlCliQuestion;

static const HlCliQuestion questions[] = {
  { HL_INVERSE_OFFSET_FOR_ARM, HL_LOAD_SITE_N, "offset-for-arm", true },
  { HL_INVERSE_OFFSET_FOR_GLOBAL, HL_LOAD_SITE_N, "offset-for-global", true },
  { HL_INVERSE_CANE_FOR_JRF, HL_LOAD_SITE_N, "cane-for-jrf", false },
  { HL_INVERSE_LOAD_FOR_JRF, HL_LOAD_SITE_CONTRALATERAL, "load-for-jrf", false },
  { HL_INVERSE_LOAD_FOR_JRF, HL_LOAD_SITE_IPSILATERAL, "load-for-jrf", false },
  { HL_INVERSE_LOAD_FOR_JRF, HL_LOAD_SITE_MIDLINE, "load-for-jrf", false },
  { HL_INVERSE_LEAN_FOR_CAPACITY, HL_LOAD_SITE_N, "lean-for-capacity", false },
};

static const char *const site_keys[] = { "contralateral", "ipsilateral", "midline" };

static HlStatus
ask (const HlCliQuestion *q, const HlModel *model, const HlPlan *plan,
     const HlRecon *recon, double target, HlInverseAnswer *a, HlError *err)
{
  switch (q->kind)
    {
    case HL_INVERSE_OFFSET_FOR_ARM:
      return hl_inverse_offset_for_arm (model, recon, NULL, a, err);
    case HL_INVERSE_OFFSET_FOR_GLOBAL:
      return hl_inverse_offset_for_global (model, recon, NULL, a, err);
    case HL_INVERSE_CANE_FOR_JRF:
      return hl_inverse_cane_for_jrf (model, recon, target, plan->cane.distance_mm, NULL,
                                      a, err);
    case HL_INVERSE_LOAD_FOR_JRF:
      return hl_inverse_load_for_jrf (model, recon, q->site, target, NULL, a, err);
    case HL_INVERSE_LEAN_FOR_CAPACITY:
    case HL_INVERSE_N:
    default:
      break;
    }
  return hl_inverse_lean_for_capacity (model, recon, NULL, a, err);
}

static const char *
answer_status_key (HlStatus st)
{
  return st == HL_OK ? "ok" : st == HL_ERR_NOT_REACHABLE ? "not-reachable" : "not-converged";
}

int
hl_cli_inverse (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *path = args->operands[0];
  const char *format = args->value[INVERSE_OPT_FORMAT];
  double target = HL_REPORT_TARGET_JRF_BW_DEFAULT;
  bool csv;

  if (format == NULL || strcmp (format, "text") == 0)
    csv = false;
  else if (strcmp (format, "csv") == 0)
    csv = true;
  else
    return hl_cli_usage_error (_("%s: unknown format '%s' (use text or csv)"), cmd->name,
                               format);
  if (args->value[INVERSE_OPT_TARGET] != NULL
      && !parse_double (args->value[INVERSE_OPT_TARGET], &target))
    return hl_cli_usage_error (_("%s: --target-jrf '%s' is not a number"), cmd->name,
                               args->value[INVERSE_OPT_TARGET]);
  if (!(target >= HL_REPORT_TARGET_JRF_BW_MIN && target <= HL_REPORT_TARGET_JRF_BW_MAX))
    {
      hl_cli_error (_("%s: --target-jrf: %g x body weight is outside %g to %g"), cmd->name,
                    target, HL_REPORT_TARGET_JRF_BW_MIN, HL_REPORT_TARGET_JRF_BW_MAX);
      return HL_CLI_EXIT_INVALID;
    }

  HlPlan *plan = hl_cli_load_plan (path);
  HlModel model;
  if (plan == NULL || !prepare (path, plan, &model))
    {
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  GString *buf = g_string_new (NULL);
  int status = HL_CLI_EXIT_OK;
  if (csv)
    g_string_append_printf (buf, "option,question,site,status,value,unit,goal,achieved,lower,"
                             "upper,at_limit,range_limited,answer\n");
  else
    {
      g_string_append_printf (buf, _("Plan: %s\nCase: %s\n"), path, plan->label);
      g_string_append_printf (buf, _("Joint-load target: %.2f x body weight%s\n"), target,
                         args->value[INVERSE_OPT_TARGET] == NULL
                         ? _(" (our default; --target-jrf to change)") : "");
      g_string_append_printf (buf, "%s\n", hl_inverse_caveat ());
    }

  for (size_t row = 0; row <= plan->n_options && status == HL_CLI_EXIT_OK; row++)
    {
      const HlRecon *recon = row == 0 ? NULL : &plan->options[row - 1].recon;
      if (!csv)
        g_string_append_printf (buf, row == 0 ? "\n%s:\n" : _("\noption \"%s\":\n"),
                           row == 0 ? _("native") : plan->options[row - 1].name);
      for (size_t i = 0; i < sizeof questions / sizeof questions[0]; i++)
        {
          const HlCliQuestion *q = &questions[i];
          HlInverseAnswer a;
          HlError err;
          char text[512];

          if (q->options_only && recon == NULL)
            continue;
          hl_error_clear (&err);
          HlStatus st = ask (q, &model, plan, recon, target, &a, &err);
          if (st != HL_OK && st != HL_ERR_NOT_REACHABLE && st != HL_ERR_NOT_CONVERGED)
            {
              char context[HL_NAME_MAX + 32];
              snprintf (context, sizeof context, row == 0 ? "%s" : _("option \"%s\""),
                        row == 0 ? _("native") : plan->options[row - 1].name);
              hl_cli_report_error (path, context, &err);
              status = HL_CLI_EXIT_INVALID;
              break;
            }
          hl_inverse_answer_format (&a, text, sizeof text);
          if (!csv)
            {
              g_string_append_printf (buf, "  %s\n", text);
              continue;
            }
          hl_csv_field_append (buf, case_name (plan, row));
          g_string_append_printf (buf, ",%s,%s,%s", q->key,
                             q->site < HL_LOAD_SITE_N ? site_keys[q->site] : "",
                             answer_status_key (st));
          buf_number (buf, HL_CLI_INVERSE_CSV_PRECISION, st == HL_OK ? a.value : NAN);
          g_string_append_printf (buf, ",%s", a.unit != NULL ? a.unit : "");
          buf_number (buf, HL_CLI_INVERSE_CSV_PRECISION, a.goal);
          buf_number (buf, HL_CLI_INVERSE_CSV_PRECISION, a.achieved);
          buf_number (buf, HL_CLI_INVERSE_CSV_PRECISION, a.lower);
          buf_number (buf, HL_CLI_INVERSE_CSV_PRECISION, a.upper);
          g_string_append_printf (buf, ",%s,%s,", a.at_limit ? "true" : "false",
                             a.range_limited ? "true" : "false");
          hl_csv_field_append (buf, text);
          g_string_append_len (buf, "\n", 1);
        }
    }
  if (status == HL_CLI_EXIT_OK && !csv)
    g_string_append_printf (buf, "\n%s %s\n", _("Caution:"), hl_caution_text ());
  if (status == HL_CLI_EXIT_OK)
    status = write_stdout (path, buf);
  g_string_free (buf, TRUE);
  hl_plan_free (plan);
  return status;
}

/* ---- sweep ------------------------------------------------------------------ */

int
hl_cli_sweep (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *path = args->operands[0];
  const char *name = args->value[SWEEP_OPT_PARAM];
  const char *names[] = { "--param NAME", "--from A", "--to B", "--steps N" };
  HlSweepSpec spec;
  double steps;

  memset (&spec, 0, sizeof spec);
  spec.mode = HL_SWEEP_MODE_SET;
  const char *mode = args->value[SWEEP_OPT_MODE];
  if (mode != NULL && strcmp (mode, "add") == 0)
    spec.mode = HL_SWEEP_MODE_ADD;
  else if (mode != NULL && strcmp (mode, "set") != 0)
    return hl_cli_usage_error (_("%s: --mode '%s' is neither add nor set"), cmd->name,
                               mode);

  for (int i = SWEEP_OPT_PARAM; i <= SWEEP_OPT_STEPS; i++)
    if (args->value[i] == NULL)
      return hl_cli_usage_error (_("%s: missing %s"), cmd->name, names[i]);
  spec.param = hl_sweep_param_from_key (name);
  if (spec.param == HL_SWEEP_N)
    return hl_cli_usage_error (_("%s: unknown parameter '%s' (see --help for the names)"),
                               cmd->name, name);
  if (!parse_double (args->value[SWEEP_OPT_FROM], &spec.from))
    return hl_cli_usage_error (_("%s: --from '%s' is not a number"), cmd->name,
                               args->value[SWEEP_OPT_FROM]);
  if (!parse_double (args->value[SWEEP_OPT_TO], &spec.to))
    return hl_cli_usage_error (_("%s: --to '%s' is not a number"), cmd->name,
                               args->value[SWEEP_OPT_TO]);
  if (!parse_double (args->value[SWEEP_OPT_STEPS], &steps) || steps != floor (steps))
    return hl_cli_usage_error (_("%s: --steps '%s' is not a whole number"), cmd->name,
                               args->value[SWEEP_OPT_STEPS]);
  if (!(steps >= 2 && steps <= HL_SWEEP_STEPS_MAX))
    {
      hl_cli_error (_("%s: --steps %g: a sweep needs 2 to %d values"), cmd->name, steps,
                    HL_SWEEP_STEPS_MAX);
      return HL_CLI_EXIT_INVALID;
    }
  spec.n_steps = (size_t) steps;

  HlPlan *plan = hl_cli_load_plan (path);
  HlModel model;
  if (plan == NULL || !prepare (path, plan, &model))
    {
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  /* Computed and written a block of values at a time, never held whole:
   * a first pass finds any point that cannot be solved (then nothing is
   * written), the second writes. */
  size_t rows = 1 + plan->n_options;
  if (spec.n_steps > HL_SWEEP_ROWS_MAX / rows)
    {
      hl_cli_error (_("%s: a sweep of %zu values for native and %zu options gives %zu "
                      "rows, more than the %d a sweep may have: use fewer values"),
                    path, spec.n_steps, plan->n_options, spec.n_steps * rows,
                    HL_SWEEP_ROWS_MAX);
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }
  size_t block = spec.n_steps < HL_CLI_SWEEP_BLOCK ? spec.n_steps : HL_CLI_SWEEP_BLOCK;
  size_t n = rows * block;
  double *values = calloc (block, sizeof *values);
  HlResult *results = calloc (n, sizeof *results);
  HlStatus *st = calloc (n, sizeof *st);
  int status = HL_CLI_EXIT_OK;
  HlError err;
  hl_error_clear (&err);
  if (values == NULL || results == NULL || st == NULL)
    {
      hl_cli_error (_("%s: out of memory"), path);
      status = HL_CLI_EXIT_INVALID;
    }
  for (size_t first = 0; status == HL_CLI_EXIT_OK && first < spec.n_steps; first += block)
    {
      size_t count = spec.n_steps - first < block ? spec.n_steps - first : block;
      if (hl_sweep_run_steps (plan, &model, &spec, first, count, values, results, st, n,
                              &err) != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          status = HL_CLI_EXIT_INVALID;
        }
    }

  bool csv = args->value[SWEEP_OPT_CSV] != NULL;
  const HlSweepParamInfo *info = hl_sweep_param_info (spec.param);
  size_t name_w = hl_cli_text_width (_("native"));
  int value_w = 0;
  GString *buf = g_string_new (NULL);
  if (status == HL_CLI_EXIT_OK && !csv)
    {
      char head[96];
      for (size_t i = 0; i < plan->n_options; i++)
        if (hl_cli_text_width (plan->options[i].name) > name_w)
          name_w = hl_cli_text_width (plan->options[i].name);
      g_string_append_printf (buf, _("Plan: %s\nSweep of %s (%s) from %g to %g in %zu values; "
                                 "--csv gives every column.\n"),
                         path, _(info->label), info->unit, spec.from, spec.to, spec.n_steps);
      if (info->per_option)
        g_string_append_printf (buf, "%s\n", spec.mode == HL_SWEEP_MODE_ADD
                       ? _("Mode add: each value is added to every option's own "
                           "setting; the native row is the reference.")
                       : _("Mode set: each value replaces every option's own "
                           "setting; the native row is the reference."));
      g_string_append_printf (buf, "\n");
      snprintf (head, sizeof head, "%s (%s)", info->key, info->unit);
      value_w = (int) strlen (head);
      g_string_append_printf (buf, "%*s  %-*s  %9s  %9s  %9s  %9s  %9s  %s\n", value_w, head,
                         (int) name_w, _("case"), "arm_mm", "Fa_N", "Fa_BW", "J_N", "J_BW",
                         _("flags"));
      status = write_stdout (path, buf);
      g_string_truncate (buf, 0);
    }
  for (size_t first = 0; status == HL_CLI_EXIT_OK && first < spec.n_steps; first += block)
    {
      size_t count = spec.n_steps - first < block ? spec.n_steps - first : block;
      hl_error_clear (&err);
      if (hl_sweep_run_steps (plan, &model, &spec, first, count, values, results, st, n,
                              &err) != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          status = HL_CLI_EXIT_INVALID;
          break;
        }
      if (csv)
        {
          /* This block as a sweep of its own: the same rows; the header
           * only once. */
          HlSweepSpec part = spec;
          part.n_steps = count;
          char *text = NULL;
          size_t size = 0;
          if (hl_sweep_to_csv (plan, &part, values, results, st, &text, &size, &err) != HL_OK)
            {
              hl_cli_report_error (path, NULL, &err);
              status = HL_CLI_EXIT_INVALID;
            }
          else
            {
              const char *from = text;
              if (first > 0)
                {
                  const char *nl = strchr (text, '\n');
                  from = nl != NULL ? nl + 1 : text + size;
                }
              fwrite (from, 1, size - (size_t) (from - text), stdout);
            }
          free (text);
          continue;
        }
      for (size_t step = 0; step < count; step++)
        for (size_t row = 0; row < rows; row++)
          {
            const HlResult *r = &results[row * count + step];
            char flags[256];
            size_t pad = name_w - hl_cli_text_width (text_case_name (plan, row));
            g_string_append_printf (buf, "%*g  %s%*s  %9.*f  %9.*f  %9.*f  %9.*f  %9.*f  %s\n",
                               value_w, values[step], text_case_name (plan, row), (int) pad, "",
                               HL_DECIMALS_MM, r->abductor_arm_mm,
                               HL_DECIMALS_N, r->abductor_force_n,
                               HL_DECIMALS_BW, r->abductor_force_bw,
                               HL_DECIMALS_N, r->jrf_n, HL_DECIMALS_BW, r->jrf_bw,
                               hl_flags_format (r->flags, ";", flags, sizeof flags));
          }
      status = write_stdout (path, buf);
      g_string_truncate (buf, 0);
    }
  if (status == HL_CLI_EXIT_OK && !csv)
    {
      g_string_append_printf (buf, "\n%s %s\n", _("Caution:"), hl_caution_text ());
      status = write_stdout (path, buf);
    }
  g_string_free (buf, TRUE);

  free (values);
  free (results);
  free (st);
  hl_plan_free (plan);
  return status;
}

/* ---- uncertainty ------------------------------------------------------------ */

int
hl_cli_uncertainty (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *path = args->operands[0];
  const char *samples_text = args->value[MC_OPT_SAMPLES];
  const char *seed_text = args->value[MC_OPT_SEED];
  bool csv = args->value[MC_OPT_CSV] != NULL;
  uint64_t seed = 0, samples = 0;

  if (samples_text != NULL && !parse_u64 (samples_text, &samples))
    return hl_cli_usage_error (_("%s: --samples '%s' is not a whole number"), cmd->name,
                               samples_text);
  if (seed_text != NULL && !parse_u64 (seed_text, &seed))
    return hl_cli_usage_error (_("%s: --seed '%s' is not a whole number from 0 to "
                                 "18446744073709551615"), cmd->name, seed_text);
  if (samples_text != NULL && (samples < 1 || samples > HL_MC_SAMPLES_MAX))
    {
      hl_cli_error (_("%s: --samples %s: from 1 to %d samples"), cmd->name, samples_text,
                    HL_MC_SAMPLES_MAX);
      return HL_CLI_EXIT_INVALID;
    }

  HlPlan *plan = hl_cli_load_plan (path);
  HlModel model;
  if (plan == NULL || !prepare (path, plan, &model))
    {
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  HlMcSettings mc;
  bool m_assumed;
  hl_mc_settings_for_plan (plan, &mc, &m_assumed);
  if (samples_text != NULL)
    mc.n_samples = (size_t) samples;
  if (seed_text != NULL)
    mc.seed = seed;
  size_t mc_rows = 1 + (plan->n_options > 0 ? plan->n_options : 1);
  if (mc.n_samples > HL_MC_SAMPLE_ROWS_MAX / mc_rows)
    {
      hl_cli_error (_("%s: %zu samples for native and %zu options make %zu sample rows, "
                      "more than the %d a run may hold: use at most %zu samples"),
                    path, mc.n_samples, plan->n_options, mc.n_samples * mc_rows,
                    HL_MC_SAMPLE_ROWS_MAX, (size_t) HL_MC_SAMPLE_ROWS_MAX / mc_rows);
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  HlMcSummary *summary = calloc (1 + plan->n_options, sizeof *summary);
  HlMcWorkspace *ws = hl_mc_workspace_new (mc.n_samples,
                                           plan->n_options > 0 ? plan->n_options : 1);
  HlMcInfo info;
  HlError err;
  int status = HL_CLI_EXIT_OK;
  hl_error_clear (&err);
  if (summary == NULL || ws == NULL)
    {
      hl_cli_error (_("%s: out of memory for %zu samples"), path, mc.n_samples);
      status = HL_CLI_EXIT_INVALID;
    }
  else if (hl_mc_run (ws, &model, plan->options, plan->n_options, &mc, summary, &info,
                      &err) != HL_OK)
    {
      hl_cli_report_error (path, NULL, &err);
      status = HL_CLI_EXIT_INVALID;
    }
  hl_mc_workspace_free (ws);

  GString *buf = g_string_new (NULL);
  if (status == HL_CLI_EXIT_OK && csv)
    {
      g_string_append_printf (buf, "option,abductor_force_BW_p05,abductor_force_BW_p50,"
                               "abductor_force_BW_p95,jrf_BW_p05,jrf_BW_p50,jrf_BW_p95,"
                               "jrf_N_p05,jrf_N_p50,jrf_N_p95,share_lower_jrf_than_native\n");
      for (size_t row = 0; row <= plan->n_options; row++)
        {
          const HlMcSummary *s = &summary[row];
          hl_csv_field_append (buf, case_name (plan, row));
          buf_number (buf, 4, s->abductor_force_bw.p05);
          buf_number (buf, 4, s->abductor_force_bw.p50);
          buf_number (buf, 4, s->abductor_force_bw.p95);
          buf_number (buf, 4, s->jrf_bw.p05);
          buf_number (buf, 4, s->jrf_bw.p50);
          buf_number (buf, 4, s->jrf_bw.p95);
          buf_number (buf, 3, s->jrf_n.p05);
          buf_number (buf, 3, s->jrf_n.p50);
          buf_number (buf, 3, s->jrf_n.p95);
          if (row == 0)
            g_string_append_printf (buf, ",");
          else
            buf_number (buf, 4, s->share_lower_jrf);
          g_string_append_len (buf, "\n", 1);
        }
    }
  else if (status == HL_CLI_EXIT_OK)
    {
      size_t name_w = hl_cli_text_width (_("native"));
      for (size_t i = 0; i < plan->n_options; i++)
        if (hl_cli_text_width (plan->options[i].name) > name_w)
          name_w = hl_cli_text_width (plan->options[i].name);
      g_string_append_printf (buf, _("Plan: %s\nCase: %s\n"), path, plan->label);
      g_string_append_printf (buf, _("Seed %" PRIu64 "; %zu samples asked, %zu used, %zu "
                                 "dropped (a row could not be solved)\n"),
                         info.seed, mc.n_samples, info.n_used, info.n_dropped);
      g_string_append_printf (buf, _("Errors (SD): landmark placement %g mm per coordinate, "
                                 "magnification %g about M = %.3f%s, abductor line angle "
                                 "%g deg\n"),
                         mc.landmark_sd_mm, mc.magnification_sd, mc.magnification,
                         m_assumed ? _(" (assumed)") : _(" (calibrated)"),
                         mc.line_angle_sd_deg);
      g_string_append_printf (buf, "%s\n\n",
                         _("Percentiles 5th / 50th / 95th (Hyndman & Fan definition 7); "
                           "native and options share each sample."));
      g_string_append_printf (buf, "%-*s  %-24s  %-24s  %s\n", (int) name_w, _("case"),
                         _("abductor force (xBW)"), _("joint force (xBW)"),
                         _("lower joint force than native"));
      for (size_t row = 0; row <= plan->n_options; row++)
        {
          const HlMcSummary *s = &summary[row];
          char a[64], j[64];
          snprintf (a, sizeof a, "%.*f / %.*f / %.*f", HL_DECIMALS_BW, s->abductor_force_bw.p05,
                    HL_DECIMALS_BW,
                    s->abductor_force_bw.p50, HL_DECIMALS_BW, s->abductor_force_bw.p95);
          snprintf (j, sizeof j, "%.*f / %.*f / %.*f", HL_DECIMALS_BW, s->jrf_bw.p05,
                    HL_DECIMALS_BW, s->jrf_bw.p50, HL_DECIMALS_BW, s->jrf_bw.p95);
          size_t pad = name_w - hl_cli_text_width (text_case_name (plan, row));
          g_string_append_printf (buf, "%s%*s  %-24s  %-24s  ", text_case_name (plan, row),
                             (int) pad, "", a, j);
          if (row == 0)
            g_string_append_printf (buf, "%s\n", _("(reference)"));
          else
            g_string_append_printf (buf, _("%.1f%% of samples\n"),
                               HL_CLI_PERCENT * s->share_lower_jrf);
        }
      g_string_append_printf (buf, "\n%s %s\n", _("Caution:"), hl_caution_text ());
    }
  if (status == HL_CLI_EXIT_OK)
    status = write_stdout (path, buf);
  g_string_free (buf, TRUE);
  free (summary);
  hl_plan_free (plan);
  return status;
}

/* ---- The radiograph under report and figure ------------------------------------ */

/* --underlay and --no-underlay: 1 asked for, 0 refused, -1 neither (the
 * default: drawn when the plan has a radiograph); -2 both (said). */
static int
underlay_choice (const HlCliCommand *cmd, const HlCliArgs *args, int on, int off)
{
  if (args->value[on] != NULL && args->value[off] != NULL)
    {
      hl_cli_usage_error (_("%s: --underlay and --no-underlay exclude each other"),
                          cmd->name);
      return -2;
    }
  return args->value[on] != NULL ? 1 : args->value[off] != NULL ? 0 : -1;
}

/* The figure's radiograph, or NULL with a line on stderr saying why it is
 * left out when it was asked for or the plan has one. */
static HlUnderlay *
figure_underlay (const char *path, const HlPlan *plan, int choice)
{
  if (choice == 0)
    return NULL;
  if (!plan->radiograph.present)
    {
      if (choice == 1)
        hl_cli_error (_("%s: --underlay: the plan has no radiograph; the figure is drawn "
                        "without one"), path);
      return NULL;
    }
  HlError err;
  hl_error_clear (&err);
  HlUnderlay *u = hl_underlay_for_plan (plan, &err);
  if (u == NULL)
    hl_cli_error (_("%s: the figure is drawn without the radiograph: %s"), path,
                  err.message);
  return u;
}

/* ---- report ------------------------------------------------------------------ */

int
hl_cli_report (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *path = args->operands[0];
  const char *out = args->value[REPORT_OPT_OUTPUT];

  if (out == NULL)
    return hl_cli_usage_error (_("%s: missing -o OUT.pdf (where to write the report)"),
                               cmd->name);
  int status = hl_cli_check_output (cmd->name, out, false, args->operands,
                                    args->n_operands);
  if (status != HL_CLI_EXIT_OK)
    return status;

  int underlay = underlay_choice (cmd, args, REPORT_OPT_UNDERLAY, REPORT_OPT_NO_UNDERLAY);
  if (underlay == -2)
    return HL_CLI_EXIT_USAGE;

  HlPlan *plan = hl_cli_load_plan (path);
  if (plan == NULL)
    return HL_CLI_EXIT_INVALID;
  if (hl_cli_check_output_radiograph (cmd->name, out, plan) != HL_CLI_EXIT_OK)
    {
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  HlReportSettings settings;
  HlError err;
  hl_report_settings_init (&settings);
  settings.underlay = underlay != 0;
  if (underlay == 1 && !plan->radiograph.present)
    hl_cli_error (_("%s: --underlay: the plan has no radiograph; the report's schematic is "
                    "drawn without one"), path);
  hl_error_clear (&err);
  HlReport *report = hl_report_new (plan, &settings, &err);
  hl_plan_free (plan);
  if (report == NULL)
    {
      hl_cli_report_error (path, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  const HlError *note = hl_report_underlay_note (report);
  if (note != NULL)
    hl_cli_error (_("%s: the report's schematic is drawn without the radiograph: %s"), path,
                  note->message);
  unsigned char *pdf = NULL;
  size_t size = 0;
  HlStatus st = hl_report_pdf_to_buffer (report, &pdf, &size, &err);
  hl_report_free (report);
  if (st == HL_OK)
    st = hl_write_file_atomic (out, pdf, size, &err);
  free (pdf);
  if (st != HL_OK)
    {
      hl_cli_report_error (st == HL_ERR_IO ? out : path, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  return HL_CLI_EXIT_OK;
}

/* ---- figure ------------------------------------------------------------------ */

int
hl_cli_figure (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *path = args->operands[0];
  const char *out = args->value[FIGURE_OPT_OUTPUT];
  const char *size_text = args->value[FIGURE_OPT_SIZE];
  const char *option_text = args->value[FIGURE_OPT_OPTION];
  int width = HL_CLI_FIGURE_WIDTH_DEFAULT, height = HL_CLI_FIGURE_HEIGHT_DEFAULT;
  HlFigureFormat format;
  uint64_t option = 0;

  if (out == NULL)
    return hl_cli_usage_error (_("%s: missing -o OUT.svg or -o OUT.png (where to write the "
                                 "figure)"), cmd->name);
  int status = hl_cli_check_output (cmd->name, out, false, args->operands,
                                    args->n_operands);
  if (status != HL_CLI_EXIT_OK)
    return status;
  if (!hl_figure_format_from_path (out, &format))
    return hl_cli_usage_error (_("%s: '%s' ends neither in .svg nor in .png"), cmd->name, out);
  if (size_text != NULL)
    {
      char x = 0, tail = 0;
      if (sscanf (size_text, "%d%c%d%c", &width, &x, &height, &tail) != 3 || x != 'x')
        return hl_cli_usage_error (_("%s: --size '%s' is not WIDTHxHEIGHT (e.g. 1200x900)"),
                                   cmd->name, size_text);
      if (width < HL_FIGURE_SIZE_MIN || width > HL_FIGURE_SIZE_MAX
          || height < HL_FIGURE_SIZE_MIN || height > HL_FIGURE_SIZE_MAX)
        {
          hl_cli_error (_("%s: --size %s: width and height must be %d to %d"), cmd->name,
                        size_text, HL_FIGURE_SIZE_MIN, HL_FIGURE_SIZE_MAX);
          return HL_CLI_EXIT_INVALID;
        }
    }
  HlRenderPreset preset = HL_RENDER_PRESET_AUTO;
  const char *preset_text = args->value[FIGURE_OPT_PRESET];
  if (preset_text != NULL)
    {
      if (strcmp (preset_text, "slide") == 0)
        preset = HL_RENDER_PRESET_SLIDE;
      else if (strcmp (preset_text, "half-slide") == 0)
        preset = HL_RENDER_PRESET_HALF_SLIDE;
      else
        return hl_cli_usage_error (_("%s: --preset '%s' is neither slide nor half-slide"),
                                   cmd->name, preset_text);
      if (size_text != NULL)
        return hl_cli_usage_error (_("%s: --preset and --size exclude each other"),
                                   cmd->name);
    }
  if (option_text != NULL && !parse_u64 (option_text, &option))
    return hl_cli_usage_error (_("%s: --option '%s' is not a whole number"), cmd->name,
                               option_text);
  int underlay_asked = underlay_choice (cmd, args, FIGURE_OPT_UNDERLAY,
                                        FIGURE_OPT_NO_UNDERLAY);
  if (underlay_asked == -2)
    return HL_CLI_EXIT_USAGE;

  HlPlan *plan = hl_cli_load_plan (path);
  if (plan == NULL)
    return HL_CLI_EXIT_INVALID;
  if (hl_cli_check_output_radiograph (cmd->name, out, plan) != HL_CLI_EXIT_OK)
    {
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }
  if (option_text == NULL)
    option = plan->n_options > 0 ? 1 : 0;
  if (option > plan->n_options)
    {
      hl_cli_error (_("%s: --option %s: the plan has %zu options (0 draws the native hip)"),
                    path, option_text, plan->n_options);
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  HlUnderlay *underlay = figure_underlay (path, plan, underlay_asked);
  HlError err;
  hl_error_clear (&err);
  HlStatus st = hl_figure_save_preset (plan, (int) option - 1, width, height, preset,
                                       underlay, out, &err);
  hl_underlay_free (underlay);
  hl_plan_free (plan);
  if (st != HL_OK)
    {
      hl_cli_report_error (st == HL_ERR_IO ? out : path, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  return HL_CLI_EXIT_OK;
}
