/* hl-cli-util.c: output helpers of hiplever-cli.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <locale.h>
#include <stdlib.h>
#include <string.h>

#include "hl-i18n.h"
#include "hl-cli.h"
#include "hl-cli-calibrate.h"
#include "hl-plan-io.h"


/* Returns s past `prefix` and `sep` when s starts with both, else s. */
static const char *
skip_prefix (const char *s, const char *prefix, const char *sep)
{
  size_t n = strlen (prefix);

  if (n > 0 && strncmp (s, prefix, n) == 0
      && strncmp (s + n, sep, strlen (sep)) == 0)
    return s + n + strlen (sep);
  return s;
}

void
hl_cli_report_error (const char *file, const char *context, const HlError *err)
{
  const char *message = err->message[0] != '\0'
                        ? err->message : hl_status_name (err->status);
  char line_prefix[HL_CLI_NUMBER_MAX];
  char element_prefix[HL_ERROR_FIELD_MAX + HL_CLI_NUMBER_MAX];

  /* The core's messages stand alone in a dialog, so they may repeat the
   * file, line and element ("FILE: line 6, element <x>: ...") that this
   * format already gives in front; say them once. */
  message = skip_prefix (message, file, ": ");
  snprintf (line_prefix, sizeof line_prefix, "line %d", err->line);
  snprintf (element_prefix, sizeof element_prefix, "element %s", err->field);
  const char *rest = err->line > 0 ? skip_prefix (message, line_prefix, ", ") : message;
  if (rest != message)
    {
      /* "line 6, element <x>: ...": the line once; the element once */
      const char *after = err->field[0] != '\0' ? skip_prefix (rest, element_prefix, ": ")
                                                : rest;
      message = after;
    }
  else if (err->line > 0)
    message = skip_prefix (message, line_prefix, ": ");   /* "line 6: ..." */

  fprintf (stderr, "%s: %s", HL_CLI_PROGRAM, file);
  if (err->line > 0)
    fprintf (stderr, ":%d", err->line);
  if (context != NULL && context[0] != '\0')
    fprintf (stderr, ": %s", context);
  if (err->field[0] != '\0' && strcmp (err->field, file) != 0)
    fprintf (stderr, ": %s", err->field);
  fprintf (stderr, ": %s\n", message);
}

void
hl_cli_error (const char *fmt, ...)
{
  va_list ap;

  fprintf (stderr, "%s: ", HL_CLI_PROGRAM);
  va_start (ap, fmt);
  vfprintf (stderr, fmt, ap);
  va_end (ap);
  fprintf (stderr, "\n");
}

int
hl_cli_usage_error (const char *fmt, ...)
{
  va_list ap;

  fprintf (stderr, "%s: ", HL_CLI_PROGRAM);
  va_start (ap, fmt);
  vfprintf (stderr, fmt, ap);
  va_end (ap);
  fprintf (stderr, "\n");
  fprintf (stderr, _("Try '%s --help' for more information.\n"),
           HL_CLI_PROGRAM);
  return HL_CLI_EXIT_USAGE;
}

size_t
hl_cli_text_width (const char *s)
{
  size_t n = 0;

  for (const unsigned char *p = (const unsigned char *) s; *p != '\0'; p++)
    if ((*p & 0xC0) != 0x80)
      n++;
  return n;
}

HlPlan *
hl_cli_load_plan (const char *path)
{
  HlPlan *plan = NULL;
  HlError err;

  hl_error_clear (&err);
  if (hl_plan_load_file (path, &plan, &err) != HL_OK)
    {
      hl_cli_report_error (path, NULL, &err);
      return NULL;
    }
  hl_cli_check_radiograph (path, plan);
  hl_cli_resolve_templates (path, plan);
  return plan;
}

/* ---- Output files ------------------------------------------------------ */

bool
hl_cli_is_stdout (const char *out)
{
  return out != NULL && strcmp (out, "-") == 0;
}

int
hl_cli_check_output (const char *command, const char *out, bool stdout_ok,
                     char *const *inputs, int n_inputs)
{
  if (hl_cli_is_stdout (out))
    {
      if (stdout_ok)
        return HL_CLI_EXIT_OK;
      return hl_cli_usage_error (_("%s: '-' (standard output) is only for text "
                                   "outputs; give a file name"), command);
    }
  for (int i = 0; i < n_inputs; i++)
    if (hl_file_same (out, inputs[i]))
      {
        hl_cli_error (_("%s: the output %s is the input %s: refused, so that the "
                        "input is not overwritten; nothing was written"),
                      command, out, inputs[i]);
        return HL_CLI_EXIT_INVALID;
      }
  HlError err;
  hl_error_clear (&err);
  if (hl_output_path_check (out, &err) != HL_OK)
    {
      hl_cli_report_error (out, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  return HL_CLI_EXIT_OK;
}

int
hl_cli_check_output_radiograph (const char *command, const char *out, const HlPlan *plan)
{
  if (out == NULL || hl_cli_is_stdout (out) || plan == NULL || !plan->radiograph.present
      || !hl_file_same (out, plan->radiograph.path))
    return HL_CLI_EXIT_OK;
  hl_cli_error (_("%s: the output %s is the plan's radiograph %s: refused, so that the "
                  "radiograph is not overwritten; nothing was written"),
                command, out, plan->radiograph.path);
  return HL_CLI_EXIT_INVALID;
}

int
hl_cli_write_output (const char *out, const void *data, size_t size)
{
  if (hl_cli_is_stdout (out))
    {
      if (size > 0 && fwrite (data, 1, size, stdout) != size)
        {
          hl_cli_error (_("could not write to standard output"));
          return HL_CLI_EXIT_INVALID;
        }
      return HL_CLI_EXIT_OK;
    }
  HlError err;
  hl_error_clear (&err);
  if (hl_write_file_atomic (out, data, size, &err) != HL_OK)
    {
      hl_cli_report_error (out, NULL, &err);
      return HL_CLI_EXIT_INVALID;
    }
  return HL_CLI_EXIT_OK;
}
