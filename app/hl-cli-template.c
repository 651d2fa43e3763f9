/* hl-cli-template.c: hiplever-cli catalogue and fit (implant templating).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The ranking itself is the core's (hl-fit.h); this file only prints it
 * and writes the plan with a chosen row.
 */
#include "config.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hl-catalogue.h"
#include "hl-fit.h"
#include "hl-i18n.h"
#include "hl-plan-io.h"
#include "hl-template.h"
#include "hl-cli.h"

enum { CATALOGUE_OPT_FORMAT };
enum { FIT_OPT_OPTION, FIT_OPT_SIZES, FIT_OPT_FORMAT, FIT_OPT_APPLY, FIT_OPT_OUTPUT,
       FIT_OPT_CATALOGUE };

/* The contract of the issue: exactly these columns. */
static const char fit_csv_header[] =
  "rank,cup_mm,liner,stem_size,version,head_mm,c_med_mm,c_sup_mm,f_off_mm,f_len_mm,"
  "leg_length_change_mm,global_offset_change_mm,leg_length_residual_mm,"
  "global_offset_residual_mm,abductor_force_BW,jrf_BW,jrf_p95_BW";
#define FIT_DECIMALS 3

const HlCliOption hl_cli_catalogue_options[] = {
  { NULL },
};

const HlCliOption hl_cli_fit_options[] = {
  { "option", 0, N_("NAME"),
    N_("the templated option to rank (default: the first templated option)") },
  { "sizes", 0, NULL,
    N_("also every cup size at the same centre and every stem size at the same seat") },
  { "format", 0, N_("FORMAT"), N_("text (default) or csv") },
  { "apply", 0, N_("RANK"),
    N_("write the plan with the combination of this rank in the option (needs -o)") },
  { "output", 'o', N_("OUT.hlplan"),
    N_("where --apply writes the plan (written atomically; - for standard output)") },
  { "catalogue", 0, N_("FILE"),
    N_("an implant catalogue to use besides the bundled demo catalogue and "
       "those in HIPLEVER_CATALOGUES") },
  { NULL },
};

/* ---- The catalogues of this run --------------------------------------- */

static HlCatalogueSet *catalogues;

/* The bundled demo catalogue and the files named in HIPLEVER_CATALOGUES
 * (separated by ':'); a file that fails to load is reported and left out. */
const HlCatalogueSet *
hl_cli_catalogues (void)
{
  if (catalogues != NULL)
    return catalogues;
  const char *env = getenv ("HIPLEVER_CATALOGUES");
  char *copy = env ? strdup (env) : NULL;
  const char *paths[64];
  size_t n = 0;
  for (char *save = NULL, *tok = copy ? strtok_r (copy, ":", &save) : NULL;
       tok != NULL && n < 64; tok = strtok_r (NULL, ":", &save))
    if (tok[0] != '\0')
      paths[n++] = tok;
  char *problems = NULL;
  if (hl_catalogue_set_load (&catalogues, paths, n, &problems) != HL_OK)
    catalogues = NULL;
  if (problems != NULL)
    {
      for (char *save = NULL, *line = strtok_r (problems, "\n", &save); line != NULL;
           line = strtok_r (NULL, "\n", &save))
        hl_cli_error (_("HIPLEVER_CATALOGUES: %s"), line);
      free (problems);
    }
  free (copy);
  return catalogues;
}

void
hl_cli_resolve_templates (const char *path, HlPlan *plan)
{
  if (hl_fit_first_templated (plan) < 0)
    return;
  char *warnings = NULL;
  hl_plan_resolve_templates (plan, hl_cli_catalogues (), &warnings);
  if (warnings == NULL)
    return;
  for (char *save = NULL, *line = strtok_r (warnings, "\n", &save); line != NULL;
       line = strtok_r (NULL, "\n", &save))
    hl_cli_error (_("%s: warning: %s"), path, line);
  free (warnings);
}

/* ---- catalogue FILE --------------------------------------------------- */

static const char *
num (char *buf, double v)
{
  hl_format_number (buf, HL_CLI_NUMBER_MAX, v == floor (v) ? 0 : 1, v);
  return buf;
}

int
hl_cli_catalogue (const HlCliCommand *cmd, const HlCliArgs *args)
{
  (void) cmd;
  const char *path = args->operands[0];
  HlCatalogue *cat = NULL;
  HlError err;
  char a[HL_CLI_NUMBER_MAX], b[HL_CLI_NUMBER_MAX];

  hl_error_clear (&err);
  if (hl_catalogue_load_file (path, &cat, &err) != HL_OK)
    {
      hl_cli_error ("%s", err.message);
      return HL_CLI_EXIT_INVALID;
    }
  fprintf (stdout, _("%s: a valid implant catalogue\n"), path);
  fprintf (stdout, _("catalogue %s, version %s: %s\n"), cat->id, cat->version,
           cat->label);
  fprintf (stdout, "sha256 %s\n", cat->sha256);
  for (size_t i = 0; i < cat->n_cups; i++)
    {
      const HlCupFamily *f = &cat->cups[i];
      fprintf (stdout, _("cup family %s (%s): %zu sizes, outer diameter (mm)"),
               f->id, f->label, f->n_sizes);
      for (size_t k = 0; k < f->n_sizes; k++)
        fprintf (stdout, " %s", num (a, f->diameters_mm[k]));
      fprintf (stdout, _("; liners"));
      for (size_t k = 0; k < f->n_liners; k++)
        fprintf (stdout, _(" %s (%s mm)"), f->liners[k].id,
                 num (a, f->liners[k].lateralisation_mm));
      fprintf (stdout, "\n");
    }
  for (size_t i = 0; i < cat->n_stems; i++)
    {
      const HlStemFamily *f = &cat->stems[i];
      fprintf (stdout, _("stem family %s (%s), %s: versions"), f->id, f->label,
               f->fixation == HL_FIXATION_CEMENTED ? _("cemented") : _("cementless"));
      for (size_t k = 0; k < f->n_versions; k++)
        fprintf (stdout, _(" %s (neck-shaft angle %s deg)"), f->versions[k].id,
                 num (a, f->versions[k].neck_shaft_angle_deg));
      fprintf (stdout, _("; %zu sizes\n"), f->n_sizes);
      for (size_t k = 0; k < f->n_sizes; k++)
        {
          const HlStemSize *s = &f->sizes[k];
          fprintf (stdout, _("  size %s: length %s mm; neck offset/height (mm)"),
                   s->size, num (a, s->length_mm));
          for (size_t v = 0; v < f->n_versions; v++)
            fprintf (stdout, " %s %s/%s", f->versions[v].id,
                     num (a, s->necks[v].offset_mm), num (b, s->necks[v].height_mm));
          fprintf (stdout, _("; body width at levels (mm)"));
          for (size_t w = s->n_body; w-- > 0;)
            fprintf (stdout, " %s:%s", num (a, s->body[w].level_mm),
                     num (b, s->body[w].width_mm));
          fprintf (stdout, "\n");
        }
    }
  for (size_t i = 0; i < cat->n_heads; i++)
    {
      const HlHeadFamily *f = &cat->heads[i];
      fprintf (stdout, _("head family %s, diameter %s mm: lengths (mm)"), f->id,
               num (a, f->diameter_mm));
      for (size_t k = 0; k < f->n_lengths; k++)
        fprintf (stdout, " %s%s", f->lengths_mm[k] > 0 ? "+" : "",
                 num (a, f->lengths_mm[k]));
      fprintf (stdout, "\n");
    }
  hl_catalogue_free (cat);
  return HL_CLI_EXIT_OK;
}

/* ---- fit PLAN ---------------------------------------------------------- */

static void
csv_number (GString *b, double v)
{
  char buf[HL_CLI_NUMBER_MAX];
  g_string_append (b, ",");
  g_string_append (b, hl_format_number (buf, sizeof buf, FIT_DECIMALS, v));
}

static void
fit_csv (GString *b, const HlFitTable *t)
{
  g_string_append (b, fit_csv_header);
  g_string_append (b, "\n");
  for (size_t i = 0; i < t->n; i++)
    {
      const HlFitRow *r = &t->rows[i];
      g_string_append_printf (b, "%zu", r->rank);
      csv_number (b, r->tmpl.cup_diameter_mm);
      g_string_append (b, ",");
      hl_csv_field_append (b, r->tmpl.liner);
      g_string_append (b, ",");
      hl_csv_field_append (b, r->tmpl.stem_size);
      g_string_append (b, ",");
      hl_csv_field_append (b, r->tmpl.version);
      csv_number (b, r->tmpl.head_length_mm);
      csv_number (b, r->recon.cup_medial_mm);
      csv_number (b, r->recon.cup_superior_mm);
      csv_number (b, r->recon.femoral_offset_mm);
      csv_number (b, r->recon.femoral_length_mm);
      csv_number (b, r->result.leg_length_change_mm);
      csv_number (b, r->result.global_offset_change_mm);
      csv_number (b, r->leg_length_residual_mm);
      csv_number (b, r->global_offset_residual_mm);
      csv_number (b, r->result.abductor_force_bw);
      csv_number (b, r->result.jrf_bw);
      csv_number (b, r->jrf_p95_bw);
      g_string_append (b, "\n");
    }
}

static void
fit_text (GString *b, const HlPlan *plan, const HlFitTable *t)
{
  char n[8][HL_CLI_NUMBER_MAX];
  const HlOption *o = &plan->options[t->option];
  g_string_append_printf (b, _("Implant combinations for option \"%s\", ranked by |leg length "
                      "residual| + |global offset residual| against %s (ties: lower "
                      "joint force); joint force 95th percentile over %zu Monte Carlo "
                      "samples.\n"),
                 o->name, t->against_other_hip ? _("the other hip") : _("the native hip"),
                 t->mc_samples_used);
  HlTemplateFrame f;
  hl_template_frame (&plan->landmarks, plan->side, &f);
  if (f.t_from_hip_centre)
    g_string_append (b, _("The lesser trochanter tip is not placed: the stem's seat is "
                      "measured from the hip centre's projection on the shaft axis.\n"));
  g_string_append_printf (b, "%5s %6s %-14s %5s %-12s %5s %7s %7s %7s %7s %7s %7s %7s %7s %6s\n",
                 _("rank"), _("cup"), _("liner"), _("stem"), _("version"), _("head"),
                 _("c_med"), _("c_sup"), _("f_off"), _("f_len"), _("LL res"),
                 _("GO res"), _("abd BW"), _("JRF BW"), _("p95"));
  for (size_t i = 0; i < t->n; i++)
    {
      const HlFitRow *r = &t->rows[i];
      hl_format_number (n[0], sizeof n[0], 1, r->recon.cup_medial_mm);
      hl_format_number (n[1], sizeof n[1], 1, r->recon.cup_superior_mm);
      hl_format_number (n[2], sizeof n[2], 1, r->recon.femoral_offset_mm);
      hl_format_number (n[3], sizeof n[3], 1, r->recon.femoral_length_mm);
      hl_format_number (n[4], sizeof n[4], 1, r->leg_length_residual_mm);
      hl_format_number (n[5], sizeof n[5], 1, r->global_offset_residual_mm);
      hl_format_number (n[6], sizeof n[6], 2, r->result.abductor_force_bw);
      hl_format_number (n[7], sizeof n[7], 2, r->result.jrf_bw);
      char p95[HL_CLI_NUMBER_MAX];
      hl_format_number (p95, sizeof p95, 2, r->jrf_p95_bw);
      g_string_append_printf (b, "%5zu %6g %-14s %5s %-12s %+5g %7s %7s %7s %7s %7s %7s %7s %7s %6s\n",
                     r->rank, r->tmpl.cup_diameter_mm, r->tmpl.liner, r->tmpl.stem_size,
                     r->tmpl.version, r->tmpl.head_length_mm, n[0], n[1], n[2], n[3],
                     n[4], n[5], n[6], n[7], p95);
    }
  g_string_append (b, _("Residual: + longer / more offset than the target. Planning aid "
                    "only: a static estimate, not a substitute for surgical judgement.\n"));
}

static long
find_option (const HlPlan *plan, const char *name)
{
  for (size_t i = 0; i < plan->n_options; i++)
    if (strcmp (plan->options[i].name, name) == 0)
      return (long) i;
  return -1;
}

int
hl_cli_fit (const HlCliCommand *cmd, const HlCliArgs *args)
{
  const char *path = args->operands[0];
  const char *name = args->value[FIT_OPT_OPTION];
  const char *format = args->value[FIT_OPT_FORMAT];
  const char *apply = args->value[FIT_OPT_APPLY];
  const char *out = args->value[FIT_OPT_OUTPUT];
  const char *extra = args->value[FIT_OPT_CATALOGUE];
  bool csv = false;
  unsigned long long rank = 0;

  if (format != NULL && strcmp (format, "csv") == 0)
    csv = true;
  else if (format != NULL && strcmp (format, "text") != 0)
    return hl_cli_usage_error (_("%s: --format '%s' is neither text nor csv"), cmd->name,
                               format);
  if (apply != NULL)
    {
      char *end = NULL;
      errno = 0;
      if (apply[0] < '1' || apply[0] > '9'
          || (rank = strtoull (apply, &end, 10), *end != '\0' || errno != 0))
        return hl_cli_usage_error (_("%s: --apply '%s' is not a rank (1, 2, ...)"),
                                   cmd->name, apply);
      if (out == NULL)
        return hl_cli_usage_error (_("%s: --apply needs -o OUT.hlplan (where to write "
                                     "the plan)"), cmd->name);
      /* The inputs: the plan, the catalogue given with --catalogue and
       * those named in HIPLEVER_CATALOGUES. */
      const char *env = getenv ("HIPLEVER_CATALOGUES");
      char *copy = env != NULL ? strdup (env) : NULL;
      char *inputs[2 + 64] = { args->operands[0] };
      int n_inputs = 1;
      if (extra != NULL)
        inputs[n_inputs++] = (char *) extra;
      for (char *save = NULL, *tok = copy ? strtok_r (copy, ":", &save) : NULL;
           tok != NULL && n_inputs < (int) (sizeof inputs / sizeof inputs[0]);
           tok = strtok_r (NULL, ":", &save))
        if (tok[0] != '\0')
          inputs[n_inputs++] = tok;
      int st = hl_cli_check_output (cmd->name, out, true, inputs, n_inputs);
      free (copy);
      if (st != HL_CLI_EXIT_OK)
        return st;
    }
  else if (out != NULL)
    return hl_cli_usage_error (_("%s: -o writes the plan of --apply RANK; give --apply "
                                 "too"), cmd->name);

  const HlCatalogueSet *set = hl_cli_catalogues ();
  if (set == NULL)
    {
      hl_cli_error (_("out of memory"));
      return HL_CLI_EXIT_INVALID;
    }
  if (extra != NULL)
    {
      HlCatalogue *cat = NULL;
      HlError err;
      hl_error_clear (&err);
      if (hl_catalogue_load_file (extra, &cat, &err) != HL_OK)
        {
          hl_cli_error ("%s", err.message);
          return HL_CLI_EXIT_INVALID;
        }
      if (hl_catalogue_set_add ((HlCatalogueSet *) set, cat) != HL_OK)
        {
          hl_catalogue_free (cat);
          hl_cli_error (_("out of memory"));
          return HL_CLI_EXIT_INVALID;
        }
    }

  HlPlan *plan = hl_cli_load_plan (path);   /* resolves the templates */
  if (plan == NULL)
    return HL_CLI_EXIT_INVALID;
  if (apply != NULL
      && hl_cli_check_output_radiograph (cmd->name, out, plan) != HL_CLI_EXIT_OK)
    {
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }
  long option = name ? find_option (plan, name) : hl_fit_first_templated (plan);
  int status = HL_CLI_EXIT_OK;
  if (option < 0)
    {
      if (name != NULL)
        hl_cli_error (_("%s: --option: the plan has no option named \"%s\""), path, name);
      else
        hl_cli_error (_("%s: the plan has no templated option (an option with a "
                        "<template> of implants)"), path);
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }
  const HlTemplate *t = &plan->options[option].recon.tmpl;
  const HlCatalogue *cat = t->on ? hl_catalogue_set_find (set, t->catalogue) : NULL;
  if (t->on && !t->resolved)
    {
      hl_cli_error (_("%s: option \"%s\": its implant catalogue \"%s\" is missing or "
                      "has changed (see the warning above); nothing is ranked"),
                    path, plan->options[option].name, t->catalogue);
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  HlFitTable table;
  HlError err;
  hl_error_clear (&err);
  unsigned flags = args->value[FIT_OPT_SIZES] != NULL ? HL_FIT_SIZES : 0;
  if (hl_fit_rank (plan, (size_t) option, cat, flags, &table, &err) != HL_OK)
    {
      hl_cli_report_error (path, plan->options[option].name, &err);
      hl_plan_free (plan);
      return HL_CLI_EXIT_INVALID;
    }

  if (apply != NULL)
    {
      if (rank > table.n)
        {
          hl_cli_error (_("%s: --apply %s: there are %zu ranked combinations"), path,
                        apply, table.n);
          status = HL_CLI_EXIT_INVALID;
        }
      else
        {
          char *text = NULL;
          size_t size = 0;
          const HlFitRow *row = &table.rows[rank - 1];
          if (hl_fit_apply (plan, (size_t) option, row, cat, &err) != HL_OK
              || hl_plan_to_buffer (plan, &text, &size, &err) != HL_OK)
            {
              hl_cli_report_error (path, plan->options[option].name, &err);
              status = HL_CLI_EXIT_INVALID;
            }
          else
            {
              status = hl_cli_write_output (out, text, size);
              /* With -o - the plan is standard output; the line goes
               * beside it, to standard error. */
              if (status == HL_CLI_EXIT_OK)
                fprintf (hl_cli_is_stdout (out) ? stderr : stdout, _("%s: option \"%s\" now has rank %llu: cup %g mm, "
                                   "liner %s, stem %s size %s %s, head %+g mm\n"),
                         out, plan->options[option].name, rank,
                         row->tmpl.cup_diameter_mm, row->tmpl.liner,
                         row->tmpl.stem_family, row->tmpl.stem_size,
                         row->tmpl.version, row->tmpl.head_length_mm);
            }
          free (text);
        }
    }
  else
    {
      GString *b = g_string_new (NULL);
      if (csv)
        fit_csv (b, &table);
      else
        fit_text (b, plan, &table);
      status = hl_cli_write_output ("-", b->str, b->len);
      g_string_free (b, TRUE);
    }
  hl_fit_table_clear (&table);
  hl_plan_free (plan);
  return status;
}
