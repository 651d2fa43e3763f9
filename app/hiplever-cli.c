/* hiplever-cli.c: the command line.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Subcommands are rows of one table (commands[] below), each with its own
 * option table, so that later subcommands are one row and one function.
 * Exit codes, CSV columns and message formats are a contract with outside
 * scripts: see hl-cli.h and the --help text.
 */
#include "config.h"

#include <ctype.h>
#include <getopt.h>
#include <locale.h>
#include <math.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include <glib.h>

#include "hl-deadline.h"
#include "hl-i18n.h"
#include "hl-plan.h"
#include "hl-plan-io.h"
#include "hl-result-fields.h"
#include "hl-solve.h"
#include "hl-version.h"
#include "hl-cli.h"
#include "hl-cli-calibrate.h"

/* ---- Options and subcommands ------------------------------------------ */

/* HlCliOption, HlCliArgs and HlCliCommand are in hl-cli.h, shared with the
 * analysis subcommands (hl-cli-analysis.c). */

enum { SOLVE_OPT_FORMAT };
enum { SUMMARY_OPT_OUTPUT };
enum { BATCH_OPT_CSV, BATCH_OPT_KEEP_GOING };
enum { BENCH_OPT_QUICK };

static const HlCliOption solve_options[] = {
  { "format", 0, N_("FORMAT"),
    N_("text (the default: a table, the flags and the caution), csv, or "
       "xml (the planning summary)") },
  { NULL },
};

static const HlCliOption summary_options[] = {
  { "output", 'o', N_("OUT.xml"),
    N_("where to write the planning summary (required; written atomically; "
       "- for standard output)") },
  { NULL },
};

static const HlCliOption batch_options[] = {
  { "csv", 0, N_("OUT"),
    N_("where to write the table (required; - for standard output, where the "
       "rows go out as the plans are solved); without --keep-going a file is "
       "written only when every plan succeeds") },
  { "keep-going", 0, NULL,
    N_("go on after a plan fails: OUT holds the plans that solved, and "
       "OUT-failures (\"-failures\" before the extension: results-failures.csv) "
       "the columns plan,error; exit status 3 when some failed") },
  { NULL },
};

static const HlCliOption bench_options[] = {
  { "quick", 0, NULL, N_("smaller counts: a smoke test, not a measurement") },
  { NULL },
};

static const HlCliOption no_options[] = {
  { NULL },
};

static int cmd_solve (const HlCliCommand *cmd, const HlCliArgs *args);
static int cmd_summary (const HlCliCommand *cmd, const HlCliArgs *args);
static int cmd_validate (const HlCliCommand *cmd, const HlCliArgs *args);
static int cmd_batch (const HlCliCommand *cmd, const HlCliArgs *args);
static int cmd_bench (const HlCliCommand *cmd, const HlCliArgs *args);

static const HlCliCommand commands[] = {
  { "solve", "PLAN [--format text|csv|xml]",
    N_("Solve the native hip and every reconstruction option of a plan."),
    solve_options, 1, 1, cmd_solve },
  { "summary", "PLAN -o OUT.xml",
    N_("Write the planning summary (plan, results, caution, provenance)."),
    summary_options, 1, 1, cmd_summary },
  { "validate", "PLAN...",
    N_("Load, check and solve each plan; print \"PLAN: valid (N options)\" "
       "or what is wrong."),
    no_options, 1, -1, cmd_validate },
  { "batch", "PLAN... --csv OUT [--keep-going]",
    N_("Solve many plans into one CSV table with a first column \"plan\". "
       "If any plan fails, each failure is reported, nothing is written and "
       "the exit status is 1 (but see --keep-going). Each plan has a time "
       "budget of 10 s for loading and solving."),
    batch_options, 1, -1, cmd_batch },
  { "bench", "[--quick]",
    N_("Time the core: one solve, random what-if solves, loading plan files, "
       "a sweep and a Monte Carlo run; each figure with its target."),
    bench_options, 0, 0, cmd_bench },
  { "inverse", "PLAN [--target-jrf BW] [--format text|csv]",
    N_("Answer the inverse questions for the native hip and every option, "
       "in words: the femoral offset that restores the native moment arm or "
       "global offset, the cane force and the carried loads for a joint-load "
       "target, the lean that brings demand within capacity."),
    hl_cli_inverse_options, 1, 1, hl_cli_inverse },
  { "sweep", "PLAN --param NAME --from A --to B --steps N [--mode add|set] [--csv]",
    N_("Solve the native hip and every option over N evenly spaced values "
       "of one parameter (both ends included)."),
    hl_cli_sweep_options, 1, 1, hl_cli_sweep },
  { "uncertainty", "PLAN [--samples N] [--seed S] [--csv]",
    N_("Monte Carlo ranges (5th, 50th and 95th percentiles) of abductor "
       "force and joint load, and the share of samples in which each option "
       "lowers the joint load against native."),
    hl_cli_uncertainty_options, 1, 1, hl_cli_uncertainty },
  { "report", "PLAN -o OUT.pdf [--underlay | --no-underlay]",
    N_("Write the A4 PDF report (two pages, more when the content needs them): "
       "case, inputs, results, ranges, schematic, charts, assumptions, sources "
       "and the caution."),
    hl_cli_report_options, 1, 1, hl_cli_report },
  { "figure", "PLAN -o OUT.svg|OUT.png [--size WxH | --preset slide|half-slide] [--option N] [--underlay | --no-underlay]",
    N_("Draw the schematic with the force vectors; the format follows the "
       "file name."),
    hl_cli_figure_options, 1, 1, hl_cli_figure },
  { "calibrate", "PLAN | --marker X1,Y1 X2,Y2 X3,Y3 [--diameter MM] | --two-point X1,Y1 X2,Y2 --distance MM",
    N_("The radiograph magnification (measured / true) from a plan's calibration, or from points in image mm; says when it is assumed."),
    hl_cli_calibrate_options, 0, 3, hl_cli_calibrate },
  { "catalogue", "FILE",
    N_("Check an implant catalogue and list its families and sizes (exit 0; "
       "1 with a message naming the element and line when it is invalid)."),
    hl_cli_catalogue_options, 1, 1, hl_cli_catalogue },
  { "fit", "PLAN [--option NAME] [--sizes] [--format csv|text] [--apply RANK -o OUT.hlplan]",
    N_("Rank the implant combinations of a templated option: every liner, "
       "stem version and head length with the cup and stem as placed (with "
       "--sizes also every cup and stem size), each solved, by |leg length "
       "residual| + |global offset residual| against the other hip where "
       "measured, else native; ties by the lower joint force.  --apply "
       "writes the plan with one of them."),
    hl_cli_fit_options, 1, 1, hl_cli_fit },
  { "image", "FILE",
    N_("What the program reads from an image file (DICOM, PNG, TIFF or JPEG): "
       "format, size, bits, the spacing and where it comes from, the window. "
       "Nothing identifying is printed."),
    hl_cli_image_options, 1, 1, hl_cli_image },
};

#define N_COMMANDS (sizeof commands / sizeof commands[0])

static void
print_command_help (const HlCliCommand *cmd)
{
  fprintf (stdout, "  %s %s\n      %s\n", cmd->name, cmd->synopsis,
           _(cmd->summary));
  for (const HlCliOption *o = cmd->options; o->long_name != NULL; o++)
    {
      char flag[HL_CLI_NUMBER_MAX];

      if (o->short_name != 0)
        snprintf (flag, sizeof flag, "-%c, --%s", o->short_name, o->long_name);
      else
        snprintf (flag, sizeof flag, "--%s", o->long_name);
      fprintf (stdout, "      %s%s%s\n          %s\n", flag,
               o->arg_name != NULL ? " " : "",
               o->arg_name != NULL ? _(o->arg_name) : "", _(o->help));
    }
}

static void
print_help (void)
{
  fprintf (stdout,
           _("Usage: %s SUBCOMMAND [OPTION...] [ARGUMENT...]\n"
             "       %s --help | --version\n\n"
             "A static frontal-plane estimate of single-leg stance for "
             "planning hip arthroplasty.\n\n"),
           HL_CLI_PROGRAM, HL_CLI_PROGRAM);
  fprintf (stdout, "%s\n", _("Subcommands:"));
  for (size_t i = 0; i < N_COMMANDS; i++)
    print_command_help (&commands[i]);
  fprintf (stdout, "\n%s\n", _("Options:"));
  fprintf (stdout, "  -h, --help\n      %s\n",
           _("show this help and exit (also after a subcommand)"));
  fprintf (stdout, "  -V, --version\n      %s\n",
           _("show the program and model versions and exit"));
  fprintf (stdout, "\n%s\n", _("Exit status:"));
  fprintf (stdout, "  0  %s\n", _("success"));
  fprintf (stdout, "  1  %s\n",
           _("invalid input, or an output that could not be written; "
             "the message reads \"hiplever-cli: FILE:LINE: FIELD: "
             "MESSAGE\" (the line is left out when there is none)"));
  fprintf (stdout, "  2  %s\n",
           _("usage error: unknown subcommand or option, or a missing "
             "argument"));
  fprintf (stdout, "  3  %s\n",
           _("batch --keep-going: some plans failed (listed in the "
             "failures table)"));
  fprintf (stdout, "\n%s\n", hl_caution_text ());
}

static void
print_version (void)
{
  fprintf (stdout, "%s %s\n", HL_CLI_PROGRAM, hl_program_version ());
  fprintf (stdout, _("mechanical model %s\n"), HL_MODEL_VERSION);
}

/* A negative number ("-10,0", "-.5") is a value or an operand, never an
 * option: no option has a digit for its short name. */
static bool
is_negative_number (const char *a)
{
  return a[0] == '-' && (isdigit ((unsigned char) a[1])
                         || (a[1] == '.' && isdigit ((unsigned char) a[2])));
}

/* The option whose long name is exactly name[0 .. len - 1], or -1. */
static int
exact_long_option (const HlCliCommand *cmd, const char *name, size_t len)
{
  for (int i = 0; cmd->options[i].long_name != NULL; i++)
    if (strlen (cmd->options[i].long_name) == len
        && strncmp (cmd->options[i].long_name, name, len) == 0)
      return i;
  return -1;
}

/* getopt's codes: long options past every character, an operand 1 */
#define HL_CLI_LONG_CODE 256
#define HL_CLI_HELP_CODE (HL_CLI_LONG_CODE + HL_CLI_MAX_OPTIONS)
#define HL_CLI_OPERAND 1

/* Returns HL_CLI_EXIT_OK or HL_CLI_EXIT_USAGE (with the message printed).
 * getopt_long does the parsing ("-" first in the option string: operands
 * come back in order, so options may follow them whatever POSIXLY_CORRECT
 * says; ":" after it: a missing value is told apart); the checks around it
 * keep the command line's rules: long names in full (getopt would take an
 * unambiguous prefix), a negative number as a value or an operand, no
 * empty values, and the messages of the manual page. */
static int
parse_args (const HlCliCommand *cmd, int argc, char **argv, HlCliArgs *args)
{
  struct option longopts[HL_CLI_MAX_OPTIONS + 2];
  char shortopts[3 * HL_CLI_MAX_OPTIONS + 8] = "-:h";
  size_t n_short = strlen (shortopts);
  int n = 0;

  memset (args, 0, sizeof *args);
  for (; cmd->options[n].long_name != NULL && n < HL_CLI_MAX_OPTIONS; n++)
    {
      const HlCliOption *o = &cmd->options[n];
      longopts[n] = (struct option) { o->long_name,
                                      o->arg_name != NULL ? required_argument : no_argument,
                                      NULL, HL_CLI_LONG_CODE + n };
      if (o->short_name != 0)
        {
          shortopts[n_short++] = o->short_name;
          if (o->arg_name != NULL)
            shortopts[n_short++] = ':';
        }
    }
  shortopts[n_short] = '\0';
  longopts[n] = (struct option) { "help", no_argument, NULL, HL_CLI_HELP_CODE };
  longopts[n + 1] = (struct option) { NULL, 0, NULL, 0 };

  /* argv[0] is the subcommand, as a program name for getopt */
  args->operands = calloc ((size_t) argc + 1, sizeof *args->operands);
  if (args->operands == NULL)
    return hl_cli_usage_error (_("%s: out of memory"), cmd->name);
  opterr = 0;
  optind = 0;    /* 0: GNU getopt starts afresh */
  for (;;)
    {
      /* the token getopt reads next, when it starts a new one */
      int at = optind == 0 ? 1 : optind;
      const char *token = at < argc ? argv[at] : NULL;
      if (token != NULL && is_negative_number (token))
        {
          args->operands[args->n_operands++] = argv[at];
          optind = at + 1;
          continue;
        }

      int longindex = -1;
      int c = getopt_long (argc, argv, shortopts, longopts, &longindex);
      if (c == -1)
        break;
      if (c == HL_CLI_OPERAND)
        {
          args->operands[args->n_operands++] = optarg;
          continue;
        }

      const bool is_long = token != NULL && strncmp (token, "--", 2) == 0;
      const char *name = is_long ? token + 2 : NULL;
      const char *eq = name != NULL ? strchr (name, '=') : NULL;
      const size_t len = name == NULL ? 0 : eq != NULL ? (size_t) (eq - name) : strlen (name);

      if (c == '?' || c == ':')
        {
          if (is_long)
            {
              int opt = exact_long_option (cmd, name, len);
              if (opt >= 0 && c == ':')
                return hl_cli_usage_error (_("%s: option '%s' needs a value (%s)"),
                                           cmd->name, token,
                                           _(cmd->options[opt].arg_name));
              if (opt >= 0 && eq != NULL && cmd->options[opt].arg_name == NULL)
                return hl_cli_usage_error (_("%s: option '--%s' takes no value"),
                                           cmd->name, cmd->options[opt].long_name);
              return hl_cli_usage_error (_("%s: unknown option '--%.*s'"),
                                         cmd->name, (int) len, name);
            }
          if (c == ':')
            for (int i = 0; i < n; i++)
              if (cmd->options[i].short_name == optopt)
                return hl_cli_usage_error (_("%s: option '%s' needs a value (%s)"),
                                           cmd->name, token,
                                           _(cmd->options[i].arg_name));
          return hl_cli_usage_error (_("%s: unknown option '-%c'"), cmd->name, optopt);
        }

      if (c == 'h' || c == HL_CLI_HELP_CODE)
        {
          if (is_long && len != strlen ("help"))
            return hl_cli_usage_error (_("%s: unknown option '--%.*s'"),
                                       cmd->name, (int) len, name);
          args->help = true;
          continue;
        }

      int opt = -1;
      if (c >= HL_CLI_LONG_CODE)
        opt = c - HL_CLI_LONG_CODE;
      else
        for (int i = 0; i < n; i++)
          if (cmd->options[i].short_name == c)
            opt = i;
      if (opt < 0)
        return hl_cli_usage_error (_("%s: unknown option '-%c'"), cmd->name, c);
      const HlCliOption *o = &cmd->options[opt];
      /* getopt takes an unambiguous prefix of a long name: not here */
      if (is_long && exact_long_option (cmd, name, len) != opt)
        return hl_cli_usage_error (_("%s: unknown option '--%.*s'"),
                                   cmd->name, (int) len, name);
      /* a switch with more letters after it ("-qx") */
      if (!is_long && o->arg_name == NULL && token != NULL && token[0] == '-'
          && token[1] == c && token[2] != '\0')
        return hl_cli_usage_error (_("%s: unknown option '%s'"), cmd->name, token);
      if (o->arg_name == NULL)
        args->value[opt] = "";
      else
        {
          args->value[opt] = optarg;
          if (optarg[0] == '\0')
            return hl_cli_usage_error (_("%s: option '%s' needs a value (%s)"),
                                       cmd->name, token, _(o->arg_name));
        }
    }
  /* after "--": everything is an operand */
  for (; optind < argc; optind++)
    args->operands[args->n_operands++] = argv[optind];

  if (args->help)
    return HL_CLI_EXIT_OK;
  if (args->n_operands < cmd->min_operands)
    return hl_cli_usage_error (_("%s: missing argument; usage: %s %s %s"),
                               cmd->name, HL_CLI_PROGRAM, cmd->name,
                               cmd->synopsis);
  if (cmd->max_operands >= 0 && args->n_operands > cmd->max_operands)
    return hl_cli_usage_error (_("%s: unexpected argument '%s'"), cmd->name,
                               args->operands[cmd->max_operands]);
  return HL_CLI_EXIT_OK;
}

/* ---- Results as columns ------------------------------------------------ */

/* The CSV columns after "option" (names, order and precision are a
 * contract) and the rows of the text table come from the one table of
 * result fields (core/hl-result-fields.h). */

#define HL_CLI_FLAGS_MAX 256

static const char *
case_name (const HlPlan *plan, size_t i)
{
  return i == 0 ? "native" : plan->options[i - 1].name;
}

/* Case i's name in the text output: "native" translated (the CSV keeps
 * case_name's "native"). */
static const char *
case_text_name (const HlPlan *plan, size_t i)
{
  return i == 0 ? _("native") : plan->options[i - 1].name;
}

static void
csv_header (GString *buf, bool with_plan)
{
  if (with_plan)
    g_string_append_printf (buf, "plan,");
  const HlResultField *cols[HL_RESULT_FIELD_MAX];
  size_t n_cols = hl_result_fields_for (HL_OUT_CSV, cols);
  g_string_append_printf (buf, "option");
  for (size_t c = 0; c < n_cols; c++)
    g_string_append_printf (buf, ",%s", cols[c]->csv);
  g_string_append_printf (buf, ",flags\n");
}

static void
csv_rows (GString *buf, const char *plan_name, const HlPlan *plan,
          const HlResult *results)
{
  const HlResultField *cols[HL_RESULT_FIELD_MAX];
  size_t n_cols = hl_result_fields_for (HL_OUT_CSV, cols);

  for (size_t i = 0; i <= plan->n_options; i++)
    {
      char num[HL_CLI_NUMBER_MAX];
      char flags[HL_CLI_FLAGS_MAX];

      if (plan_name != NULL)
        {
          hl_csv_field_append (buf, plan_name);
          g_string_append_len (buf, ",", 1);
        }
      hl_csv_field_append (buf, case_name (plan, i));
      for (size_t c = 0; c < n_cols; c++)
        g_string_append_printf (buf, ",%s",
                       hl_format_number (num, sizeof num, cols[c]->csv_decimals,
                                            cols[c]->get (&results[i])));
      hl_flags_format (results[i].flags, ";", flags, sizeof flags);
      g_string_append_len (buf, ",", 1);
      hl_csv_field_append (buf, flags);
      g_string_append_len (buf, "\n", 1);
    }
}

/* ---- Loading and solving ----------------------------------------------- */

/* Native and every option; the caller frees the array.  NULL on failure,
 * with the message printed (naming the option at fault). */
static HlResult *
solve_plan (const char *path, const HlPlan *plan)
{
  HlError err;
  HlResult *results = calloc (plan->n_options + 1, sizeof *results);

  if (results == NULL)
    {
      hl_cli_error (_("%s: out of memory"), path);
      return NULL;
    }
  hl_error_clear (&err);
  if (hl_plan_solve_all (plan, results, &err) != HL_OK)
    {
      hl_cli_report_error (path, NULL, &err);
      free (results);
      return NULL;
    }
  return results;
}

/* ---- solve ------------------------------------------------------------- */

static void
print_padded (const char *s, size_t width, bool right)
{
  size_t w = hl_cli_text_width (s);
  size_t pad = w < width ? width - w : 0;

  if (right)
    fprintf (stdout, "%*s%s", (int) pad, "", s);
  else
    fprintf (stdout, "%s%*s", s, (int) pad, "");
}

#define HL_CLI_COLUMN_GAP 2
#define HL_CLI_NMM_PER_NM 1000.0

static void
print_context (const char *path, const HlPlan *plan)
{
  const HlLimbTableInfo *limb = hl_limb_table_info (plan->model.limb_table);
  /* TRANSLATORS: the hand in "Cane: %s hand" and "Load in the %s hand". */
  const char *hand_name[2] = { _("contralateral"), _("ipsilateral") };

  fprintf (stdout, _("Plan: %s\n"), path);
  fprintf (stdout,
           _("Case: %s; operated side: %s; body mass %.1f kg "
             "(body weight %.0f N)\n"),
           plan->label, _(hl_side_name (plan->side)), plan->mass_kg,
           hl_plan_body_weight (plan));
  fprintf (stdout,
           _("Stance-limb mass fraction %.4f (%s); body-weight line: %s; "
             "abductor line: %s\n"),
           hl_plan_limb_fraction (plan),
           limb != NULL ? _(limb->label) : "",
           plan->model.bw_line == HL_BW_LINE_SEGMENTAL
           ? _("segmental") : _("on the midline"),
           plan->model.abductor_line == HL_ABDUCTOR_LINE_AUTO
           ? _("from origin to insertion where the origin is placed")
           : _("set angle through the insertion"));
  fprintf (stdout,
           _("Abductor capacity: %.2f N m per kg of body mass (an "
             "assumption: adjust it to the patient)\n"),
           plan->capacity.torque_nm_per_kg);
  if (plan->cane.enabled)
    fprintf (stdout, _("Cane: %s hand, %.0f N, %.0f mm from the midline\n"),
             hand_name[plan->cane.hand == HL_HAND_IPSILATERAL],
             hl_plan_cane_force (plan), plan->cane.distance_mm);
  if (hl_plan_cane_note (plan) != NULL)
    fprintf (stdout, "  %s\n", hl_plan_cane_note (plan));
  for (int h = 0; h < 2; h++)
    if (plan->loads.hand[h].mass_kg > 0.0)
      fprintf (stdout,
               _("Load in the %s hand: %.1f kg, %.0f mm from the midline\n"),
               hand_name[h], plan->loads.hand[h].mass_kg,
               plan->loads.hand[h].distance_mm);
  if (plan->loads.midline_kg > 0.0)
    fprintf (stdout, _("Load on the midline: %.1f kg\n"),
             plan->loads.midline_kg);
}

/* The width of case i's column: its name or its widest number. */
static size_t
case_width (const HlPlan *plan, const HlResult *results, size_t i,
            const HlResultField *const *rows, size_t n_rows)
{
  size_t width = hl_cli_text_width (case_text_name (plan, i));
  char num[HL_CLI_NUMBER_MAX];

  for (size_t r = 0; r < n_rows; r++)
    {
      hl_format_number (num, sizeof num, rows[r]->decimals,
                           rows[r]->get (&results[i]));
      if (strlen (num) > width)
        width = strlen (num);
    }
  return width;
}

static void
print_text (const char *path, const HlPlan *plan, const HlResult *results)
{
  const HlResultField *rows[HL_RESULT_FIELD_MAX];
  size_t n_rows = hl_result_fields_for (HL_OUT_TEXT, rows);
  size_t n_cases = plan->n_options + 1;
  size_t label_width = 0;
  char num[HL_CLI_NUMBER_MAX];

  for (size_t r = 0; r < n_rows; r++)
    {
      size_t w = hl_cli_text_width (_(rows[r]->label));
      if (w > label_width)
        label_width = w;
    }

  print_context (path, plan);
  fprintf (stdout, "\n");
  print_padded ("", label_width, false);
  for (size_t i = 0; i < n_cases; i++)
    {
      fprintf (stdout, "%*s", HL_CLI_COLUMN_GAP, "");
      print_padded (case_text_name (plan, i),
                    case_width (plan, results, i, rows, n_rows), true);
    }
  fprintf (stdout, "\n");

  for (size_t r = 0; r < n_rows; r++)
    {
      print_padded (_(rows[r]->label), label_width, false);
      for (size_t i = 0; i < n_cases; i++)
        {
          hl_format_number (num, sizeof num, rows[r]->decimals,
                               rows[r]->get (&results[i]));
          fprintf (stdout, "%*s", HL_CLI_COLUMN_GAP, "");
          print_padded (num, case_width (plan, results, i, rows, n_rows), true);
        }
      fprintf (stdout, "\n");
    }

  hl_cli_print_against_other (plan);

  fprintf (stdout, "\n%s\n", _("Flags:"));
  for (size_t i = 0; i < n_cases; i++)
    {
      const HlResult *r = &results[i];

      if (r->flags == 0)
        fprintf (stdout, "  %s: %s\n", case_text_name (plan, i), _("none"));
      for (unsigned bit = 1; bit != 0 && bit <= HL_FLAG_LAST; bit <<= 1)
        {
          if ((r->flags & bit) == 0)
            continue;
          fprintf (stdout, "  %s: %s", case_text_name (plan, i),
                   hl_flag_text ((HlFlag) bit));
          if (bit == HL_FLAG_ABDUCTORS_NOT_NEEDED)
            fprintf (stdout, _(" (unbalanced moment %.3f N m)"),
                     fabs (r->unbalanced_nmm) / HL_CLI_NMM_PER_NM);
          fprintf (stdout, "\n");
          if (bit == HL_FLAG_IMPLAUSIBLE)
            {
              char why[4 * HL_ERROR_MESSAGE_MAX];
              hl_implausible_describe_all (r, "\n    - ", why, sizeof why);
              fprintf (stdout, "    - %s\n", why);
            }
        }
    }

  hl_cli_print_measures (plan);
  fprintf (stdout, "\n%s %s\n", _("Caution:"), hl_caution_text ());
}

typedef enum {
  FORMAT_TEXT,
  FORMAT_CSV,
  FORMAT_XML,
} HlCliFormat;

static int
cmd_solve (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *format_name = args->value[SOLVE_OPT_FORMAT];
  const char *path = args->operands[0];
  HlCliFormat format;

  if (format_name == NULL || strcmp (format_name, "text") == 0)
    format = FORMAT_TEXT;
  else if (strcmp (format_name, "csv") == 0)
    format = FORMAT_CSV;
  else if (strcmp (format_name, "xml") == 0)
    format = FORMAT_XML;
  else
    return hl_cli_usage_error (_("%s: unknown format '%s' (use text, csv or xml)"),
                               cmd->name, format_name);

  HlPlan *plan = hl_cli_load_plan (path);
  if (plan == NULL)
    return HL_CLI_EXIT_INVALID;

  int status = HL_CLI_EXIT_OK;
  if (format == FORMAT_XML)
    {
      char *xml = NULL;
      size_t size = 0;
      HlError err;

      hl_error_clear (&err);
      if (hl_summary_to_buffer_solved (plan, NULL, &xml, &size, &err) != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          status = HL_CLI_EXIT_INVALID;
        }
      else
        {
          fwrite (xml, 1, size, stdout);
        }
      free (xml);
      hl_plan_free (plan);
      return status;
    }

  HlResult *results = solve_plan (path, plan);
  if (results == NULL)
    {
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  if (format == FORMAT_CSV)
    {
      GString *buf = g_string_new (NULL);

      csv_header (buf, false);
      csv_rows (buf, NULL, plan, results);
      fwrite (buf->str, 1, buf->len, stdout);
      g_string_free (buf, TRUE);
    }
  else
    {
      print_text (path, plan, results);
    }

  free (results);
  hl_plan_free (plan);
  return status;
}

/* ---- summary ----------------------------------------------------------- */

static int
cmd_summary (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *out = args->value[SUMMARY_OPT_OUTPUT];
  const char *path = args->operands[0];

  if (out == NULL)
    return hl_cli_usage_error (_("%s: missing -o OUT.xml (where to write the "
                                 "summary)"), cmd->name);

  int status = hl_cli_check_output (cmd->name, out, true, args->operands,
                                    args->n_operands);
  if (status != HL_CLI_EXIT_OK)
    return status;
  HlPlan *plan = hl_cli_load_plan (path);
  if (plan == NULL)
    return HL_CLI_EXIT_INVALID;
  status = hl_cli_check_output_radiograph (cmd->name, out, plan);
  if (status != HL_CLI_EXIT_OK)
    {
      hl_plan_free (plan);
      return status;
    }

  HlError err;
  hl_error_clear (&err);
  HlStatus st;
  if (hl_cli_is_stdout (out))
    {
      char *xml = NULL;
      size_t size = 0;
      st = hl_summary_to_buffer_solved (plan, NULL, &xml, &size, &err);
      if (st == HL_OK)
        status = hl_cli_write_output (out, xml, size);
      free (xml);
    }
  else
    st = hl_summary_save_file_solved (plan, out, &err);
  hl_plan_free (plan);
  if (status != HL_CLI_EXIT_OK)
    return status;
  if (st != HL_OK)
    {
      /* An I/O failure is the output's; anything else is the plan's. */
      hl_cli_report_error (st == HL_ERR_IO ? out : path, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  return HL_CLI_EXIT_OK;
}

/* ---- validate ---------------------------------------------------------- */

static int
cmd_validate (const HlCliCommand *cmd, const HlCliArgs *args)
{
  int status = HL_CLI_EXIT_OK;

  for (int i = 0; i < args->n_operands; i++)
    {
      const char *path = args->operands[i];
      HlPlan *plan = hl_cli_load_plan (path);
      HlResult *results = plan != NULL ? solve_plan (path, plan) : NULL;

      if (results != NULL)
        fprintf (stdout,
                 ngettext ("%s: valid (%zu option)\n",
                           "%s: valid (%zu options)\n",
                           plan->n_options),
                 path, plan->n_options);
      else
        status = HL_CLI_EXIT_INVALID;
      free (results);
      hl_plan_free (plan);
    }
  return status;
}

/* ---- batch ------------------------------------------------------------- */

/* Where the table goes: a file written atomically as it grows, or
 * standard output. */
typedef struct {
  const char *path;
  HlOutFile *file;   /* NULL for standard output */
  int status;        /* the first failure's exit status */
} BatchOut;

static int
batch_out_open (BatchOut *o, const char *path)
{
  o->path = path;
  o->file = NULL;
  o->status = HL_CLI_EXIT_OK;
  if (hl_cli_is_stdout (path))
    return HL_CLI_EXIT_OK;
  HlError err;
  hl_error_clear (&err);
  if (hl_out_file_open (path, false, &o->file, &err) != HL_OK)
    {
      hl_cli_report_error (path, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  return HL_CLI_EXIT_OK;
}

/* Writes and empties buf. */
static void
batch_out_put (BatchOut *o, GString *buf)
{
  if (o->status == HL_CLI_EXIT_OK && buf->len > 0)
    {
      HlError err;
      hl_error_clear (&err);
      if (o->file == NULL)
        {
          if (fwrite (buf->str, 1, buf->len, stdout) != buf->len)
            o->status = HL_CLI_EXIT_INVALID;
        }
      else if (hl_out_file_write (o->file, buf->str, buf->len, &err) != HL_OK)
        {
          hl_cli_report_error (o->path, NULL, &err);
          o->status = HL_CLI_EXIT_INVALID;
        }
    }
  g_string_truncate (buf, 0);
}

/* Keeps the file (commit) or leaves what was there (abort). */
static int
batch_out_close (BatchOut *o, bool keep)
{
  if (o->file == NULL)
    return o->status;
  if (!keep || o->status != HL_CLI_EXIT_OK)
    {
      hl_out_file_abort (o->file);
      return o->status;
    }
  HlError err;
  hl_error_clear (&err);
  if (hl_out_file_commit (o->file, &err) != HL_OK)
    {
      hl_cli_report_error (o->path, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  return HL_CLI_EXIT_OK;
}

/* OUT with "-failures" before the extension: results.csv gives
 * results-failures.csv, results gives results-failures.  Malloc'd. */
static char *
failures_path (const char *out)
{
  const char *slash = strrchr (out, '/');
  const char *base = slash != NULL ? slash + 1 : out;
  const char *dot = strrchr (base, '.');
  if (dot == NULL || dot == base)
    dot = base + strlen (base);
  size_t n = strlen (out) + sizeof HL_CLI_FAILURES_SUFFIX;
  char *path = malloc (n);
  if (path != NULL)
    snprintf (path, n, "%.*s" HL_CLI_FAILURES_SUFFIX "%s", (int) (dot - out), out, dot);
  return path;
}

/* A plan's time budget in a batch, s: HL_CLI_BATCH_PLAN_SECONDS, or
 * HIPLEVER_BATCH_PLAN_SECONDS (a positive number up to 3600; for the
 * tests). */
static double
batch_plan_seconds (void)
{
  const char *env = getenv ("HIPLEVER_BATCH_PLAN_SECONDS");
  if (env != NULL && *env != '\0')
    {
      char *end = NULL;
      double v = g_ascii_strtod (env, &end);
      if (end != env && *end == '\0' && isfinite (v) && v > 0.0 && v <= 3600.0)
        return v;
    }
  return HL_CLI_BATCH_PLAN_SECONDS;
}

/* Loads and solves one plan of a batch and checks its radiograph, within
 * the plan's time budget (hl-deadline.h: the core's loops stop when it
 * runs out); on failure err says why, with the option at fault in front. */
static HlResult *
batch_solve_within (const char *path, char *const *outs, HlPlan **plan_out,
                    bool *clash, HlError *err)
{
  HlPlan *plan = NULL;

  *plan_out = NULL;
  if (hl_plan_load_file (path, &plan, err) != HL_OK)
    return NULL;
  /* An output that is this plan's radiograph stops the whole batch. */
  for (int i = 0; i < 2; i++)
    if (outs[i] != NULL
        && hl_cli_check_output_radiograph ("batch", outs[i], plan) != HL_CLI_EXIT_OK)
      {
        *clash = true;
        hl_plan_free (plan);
        return NULL;
      }
  HlModel model;
  HlResult *results = NULL;
  if (hl_model_prepare (&model, plan, err) == HL_OK)
    {
      results = calloc (plan->n_options + 1, sizeof *results);
      if (results == NULL)
        hl_error_set (err, HL_ERR_NOMEM, "", "%s", _("out of memory"));
    }
  for (size_t i = 0; results != NULL && i <= plan->n_options; i++)
    {
      const HlRecon *recon = i == 0 ? NULL : &plan->options[i - 1].recon;
      if (hl_deadline_passed ())
        {
          hl_deadline_error (err, _("loading and solving"));
          free (results);
          results = NULL;
          break;
        }
      HlError step;
      hl_error_clear (&step);
      if (hl_model_solve (&model, recon, &results[i], &step) != HL_OK)
        {
          char context[HL_NAME_MAX + HL_CLI_NUMBER_MAX];
          if (i == 0)
            snprintf (context, sizeof context, "%s", _("native"));
          else
            snprintf (context, sizeof context, _("option \"%s\""),
                      plan->options[i - 1].name);
          hl_error_set (err, step.status, step.field, "%s: %s", context, step.message);
          free (results);
          results = NULL;
        }
    }
  if (results != NULL)
    hl_cli_check_radiograph (path, plan);
  if (results != NULL && hl_deadline_passed ())
    {
      hl_deadline_error (err, _("loading and solving"));
      free (results);
      results = NULL;
    }
  if (results == NULL)
    {
      hl_plan_free (plan);
      return NULL;
    }
  *plan_out = plan;
  return results;
}

static HlResult *
batch_solve (const char *path, char *const *outs, HlPlan **plan_out, bool *clash,
             HlError *err)
{
  hl_deadline_begin (batch_plan_seconds ());
  HlResult *results = batch_solve_within (path, outs, plan_out, clash, err);
  hl_deadline_end ();
  return results;
}

static int
cmd_batch (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *out = args->value[BATCH_OPT_CSV];
  bool keep_going = args->value[BATCH_OPT_KEEP_GOING] != NULL;
  bool progress = isatty (STDERR_FILENO);
  bool progress_shown = false;
  int n_failed = 0;

  if (out == NULL)
    return hl_cli_usage_error (_("%s: missing --csv OUT (where to write the "
                                 "table)"), cmd->name);
  int status = hl_cli_check_output (cmd->name, out, true, args->operands,
                                    args->n_operands);
  if (status != HL_CLI_EXIT_OK)
    return status;

  /* The failures table, with --keep-going and a file for the table. */
  char *fail_path = NULL;
  BatchOut fail_out = { 0 };
  GString *fail_buf = g_string_new (NULL);
  if (keep_going && !hl_cli_is_stdout (out))
    {
      fail_path = failures_path (out);
      if (fail_path == NULL)
        {
          hl_cli_error (_("%s: out of memory"), cmd->name);
          return HL_CLI_EXIT_INVALID;
        }
      status = hl_cli_check_output (cmd->name, fail_path, false, args->operands,
                                    args->n_operands);
      if (status == HL_CLI_EXIT_OK)
        status = batch_out_open (&fail_out, fail_path);
      if (status != HL_CLI_EXIT_OK)
        {
          free (fail_path);
          return status;
        }
      g_string_append (fail_buf, "plan,error\n");
    }

  BatchOut table;
  status = batch_out_open (&table, out);
  if (status != HL_CLI_EXIT_OK)
    {
      if (fail_path != NULL)
        batch_out_close (&fail_out, false);
      free (fail_path);
      return status;
    }
  GString *buf = g_string_new (NULL);
  csv_header (buf, true);
  batch_out_put (&table, buf);
  char *outs[2] = { hl_cli_is_stdout (out) ? NULL : (char *) out, fail_path };

  for (int i = 0; i < args->n_operands; i++)
    {
      const char *path = args->operands[i];
      HlPlan *plan = NULL;
      HlError err;

      if (progress_shown)
        fprintf (stderr, "\r");
      hl_error_clear (&err);
      bool clash = false;
      HlResult *results = batch_solve (path, outs, &plan, &clash, &err);
      if (clash)
        {
          /* The message is printed; nothing is written. */
          batch_out_close (&table, false);
          if (fail_path != NULL)
            batch_out_close (&fail_out, false);
          g_string_free (buf, TRUE);
          g_string_free (fail_buf, TRUE);
          free (fail_path);
          return HL_CLI_EXIT_INVALID;
        }
      if (results != NULL)
        {
          /* Without --keep-going a file is dropped after the first failure,
           * so its rows need not be written. */
          if (keep_going || n_failed == 0 || table.file == NULL)
            {
              csv_rows (buf, path, plan, results);
              batch_out_put (&table, buf);
            }
        }
      else
        {
          n_failed++;
          hl_cli_report_error (path, NULL, &err);
          if (fail_path != NULL)
            {
              hl_csv_field_append (fail_buf, path);
              g_string_append_len (fail_buf, ",", 1);
              hl_csv_field_append (fail_buf, err.message[0] != '\0'
                                           ? err.message : hl_status_name (err.status));
              g_string_append_len (fail_buf, "\n", 1);
              batch_out_put (&fail_out, fail_buf);
            }
        }
      free (results);
      hl_plan_free (plan);

      if (progress)
        {
          fprintf (stderr, "%d/%d", i + 1, args->n_operands);
          progress_shown = true;
        }
    }
  if (progress_shown)
    fprintf (stderr, "\n");
  g_string_free (buf, TRUE);

  if (keep_going)
    {
      status = batch_out_close (&table, true);
      if (fail_path != NULL)
        {
          batch_out_put (&fail_out, fail_buf);
          int fs = batch_out_close (&fail_out, true);
          if (status == HL_CLI_EXIT_OK)
            status = fs;
        }
      g_string_free (fail_buf, TRUE);
      if (status == HL_CLI_EXIT_OK && n_failed > 0)
        {
          if (fail_path != NULL)
            hl_cli_error (ngettext ("%s: %d of %d plan failed; the table of the others "
                                    "is in %s, the failures in %s",
                                    "%s: %d of %d plans failed; the table of the others "
                                    "is in %s, the failures in %s", args->n_operands),
                          cmd->name, n_failed, args->n_operands, out, fail_path);
          else
            hl_cli_error (ngettext ("%s: %d of %d plan failed",
                                    "%s: %d of %d plans failed", args->n_operands),
                          cmd->name, n_failed, args->n_operands);
          status = HL_CLI_EXIT_PARTIAL;
        }
      free (fail_path);
      return status;
    }

  if (n_failed > 0)
    {
      batch_out_close (&table, false);
      if (table.file != NULL)
        hl_cli_error (ngettext ("%s: %d of %d plan failed; nothing was written "
                                "to %s",
                                "%s: %d of %d plans failed; nothing was written "
                                "to %s", args->n_operands),
                      cmd->name, n_failed, args->n_operands, out);
      else
        hl_cli_error (ngettext ("%s: %d of %d plan failed",
                                "%s: %d of %d plans failed", args->n_operands),
                      cmd->name, n_failed, args->n_operands);
      return HL_CLI_EXIT_INVALID;
    }
  return batch_out_close (&table, true);
}

/* ---- bench ------------------------------------------------------------- */

static int
cmd_bench (const HlCliCommand *cmd, const HlCliArgs *args)
{
  return hl_cli_bench (args->value[BENCH_OPT_QUICK] != NULL);
}

/* ---- main -------------------------------------------------------------- */

static const HlCliCommand *
find_command (const char *name)
{
  for (size_t i = 0; i < N_COMMANDS; i++)
    if (strcmp (commands[i].name, name) == 0)
      return &commands[i];
  return NULL;
}

int
main (int argc, char **argv)
{
  setlocale (LC_ALL, "");
  /* Messages in the user's language, numbers always with a point: every
   * CSV, table and message the command line prints is read by programs as
   * well as people (hl_format_number does the same in the core). */
  setlocale (LC_NUMERIC, "C");
  /* Uninstalled runs (the tests) use the catalogues built in the build tree. */
  const char *localedir = getenv ("HIPLEVER_LOCALEDIR");
  bindtextdomain (GETTEXT_PACKAGE, localedir != NULL && localedir[0] != '\0' ? localedir
                                                                              : HL_LOCALEDIR);
  bind_textdomain_codeset (GETTEXT_PACKAGE, "UTF-8");
  textdomain (GETTEXT_PACKAGE);

  if (argc < 2)
    return hl_cli_usage_error (_("missing subcommand"));

  const char *first = argv[1];
  if (strcmp (first, "--help") == 0 || strcmp (first, "-h") == 0)
    {
      print_help ();
      return HL_CLI_EXIT_OK;
    }
  if (strcmp (first, "--version") == 0 || strcmp (first, "-V") == 0)
    {
      print_version ();
      return HL_CLI_EXIT_OK;
    }
  if (first[0] == '-')
    return hl_cli_usage_error (_("unknown option '%s'"), first);

  const HlCliCommand *cmd = find_command (first);
  if (cmd == NULL)
    return hl_cli_usage_error (_("unknown subcommand '%s'"), first);

  HlCliArgs args;
  int status = parse_args (cmd, argc - 1, argv + 1, &args);
  if (status != HL_CLI_EXIT_OK)
    {
      free (args.operands);
      return status;
    }

  if (args.help)
    {
      fprintf (stdout, _("Usage: %s %s\n\n"), HL_CLI_PROGRAM,
               cmd->name);
      print_command_help (cmd);
      fprintf (stdout, "\n%s\n", _("Run 'hiplever-cli --help' for "
                                   "every subcommand."));
    }
  else
    {
      status = cmd->run (cmd, &args);
    }

  free (args.operands);
  if (fflush (stdout) != 0 || ferror (stdout))
    {
      hl_cli_error (_("could not write to standard output"));
      return HL_CLI_EXIT_INVALID;
    }
  return status;
}
