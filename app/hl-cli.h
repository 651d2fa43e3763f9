/* hl-cli.h: shared parts of hiplever-cli (output helpers, exit codes).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The command line runs with LC_NUMERIC "C" (set once in main): whatever
 * it prints has numbers with '.', its words are translated.
 */
#pragma once

#include <glib.h>

#include "hl-text.h"
#include "hl-catalogue.h"
#include "hl-plan.h"

#include <stdarg.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

#include "hl-types.h"

#define HL_CLI_PROGRAM "hiplever-cli"

/* Exit codes: a contract with outside scripts. */
typedef enum {
  HL_CLI_EXIT_OK = 0,
  HL_CLI_EXIT_INVALID = 1,   /* invalid input, or an output that could not be written */
  HL_CLI_EXIT_USAGE = 2,     /* unknown subcommand or option, missing argument */
  HL_CLI_EXIT_PARTIAL = 3,   /* batch --keep-going: some plans failed */
} HlCliExit;

/* batch: the failures table beside OUT, and each plan's time budget for
 * loading, solving and checking the radiograph, s (hl-deadline.h: checked
 * inside the core's loops; parsing is bounded by the 8 MiB file and
 * 64-option limits instead); HIPLEVER_BATCH_PLAN_SECONDS sets another. */
#define HL_CLI_FAILURES_SUFFIX "-failures"
#define HL_CLI_BATCH_PLAN_SECONDS 10

/* Room for one formatted number. */
#define HL_CLI_NUMBER_MAX 64


/* "hiplever-cli: FILE:LINE: FIELD: MESSAGE" on stderr; the line is left
 * out when the error has none (0), the field when it is empty.  `context`
 * (may be NULL) is put before the field, e.g. an option's name. */
/* Loads a plan, reporting a failure on stderr (NULL then), and says on
 * stderr when its radiograph has moved or changed. */
HlPlan *hl_cli_load_plan (const char *path);
void hl_cli_report_error (const char *file, const char *context,
                          const HlError *err);
/* "hiplever-cli: MESSAGE" on stderr. */
void hl_cli_error (const char *fmt, ...)
  __attribute__ ((format (printf, 1, 2)));
/* A usage error: the message and the hint to --help on stderr; returns
 * HL_CLI_EXIT_USAGE. */
int hl_cli_usage_error (const char *fmt, ...)
  __attribute__ ((format (printf, 1, 2)));

/* Output files (-o, --csv).  "-" is standard output, for text outputs
 * only (stdout_ok); an output that is the same file as one of the inputs
 * (same device and inode) is refused, and so is a path that is not a
 * regular file or a new name (hl-file-write.h).  hl_cli_check_output runs
 * before any work; it returns HL_CLI_EXIT_OK or the exit status with the
 * message printed. */
bool hl_cli_is_stdout (const char *out);
int hl_cli_check_output (const char *command, const char *out, bool stdout_ok,
                         char *const *inputs, int n_inputs);
/* The same rule against the plan's radiograph, an input of every command
 * that loads the plan: run after loading, before anything is written;
 * returns HL_CLI_EXIT_OK or HL_CLI_EXIT_INVALID with the message printed. */
int hl_cli_check_output_radiograph (const char *command, const char *out,
                                    const HlPlan *plan);
/* Writes to out atomically, or to standard output for "-"; returns an
 * exit status, the message printed on failure. */
int hl_cli_write_output (const char *out, const void *data, size_t size);

/* Number of characters (UTF-8 code points) in s, for aligning tables. */
size_t hl_cli_text_width (const char *s);

/* ---- Subcommands ------------------------------------------------------- */

typedef struct {
  const char *long_name;
  char short_name;         /* 0 when there is none */
  const char *arg_name;    /* NULL for a switch without a value */
  const char *help;        /* N_() */
} HlCliOption;

#define HL_CLI_MAX_OPTIONS 8

typedef struct {
  const char *value[HL_CLI_MAX_OPTIONS];  /* NULL: not given; "" for a switch */
  char **operands;
  int n_operands;
  bool help;
} HlCliArgs;

typedef struct HlCliCommand HlCliCommand;

struct HlCliCommand {
  const char *name;
  const char *synopsis;        /* operands and options, for the help */
  const char *summary;         /* N_() */
  const HlCliOption *options;  /* ends with a row whose long_name is NULL */
  int min_operands;
  int max_operands;            /* -1: any number */
  int (*run) (const HlCliCommand *cmd, const HlCliArgs *args);
};

/* The analysis subcommands (hl-cli-analysis.c): their option tables and
 * run functions, for rows of the table in hiplever-cli.c. */
extern const HlCliOption hl_cli_inverse_options[];
extern const HlCliOption hl_cli_sweep_options[];
extern const HlCliOption hl_cli_uncertainty_options[];
extern const HlCliOption hl_cli_report_options[];
extern const HlCliOption hl_cli_figure_options[];
int hl_cli_inverse (const HlCliCommand *cmd, const HlCliArgs *args);
int hl_cli_sweep (const HlCliCommand *cmd, const HlCliArgs *args);
int hl_cli_uncertainty (const HlCliCommand *cmd, const HlCliArgs *args);
int hl_cli_report (const HlCliCommand *cmd, const HlCliArgs *args);
int hl_cli_figure (const HlCliCommand *cmd, const HlCliArgs *args);

/* The templating subcommands (hl-cli-template.c): catalogue and fit, and
 * the implant catalogues of this run (the bundled demo catalogue and the
 * files in HIPLEVER_CATALOGUES, ':'-separated), against which every plan
 * the command line loads is resolved (a missing or changed catalogue is a
 * warning on stderr). */
extern const HlCliOption hl_cli_catalogue_options[];
extern const HlCliOption hl_cli_fit_options[];
int hl_cli_catalogue (const HlCliCommand *cmd, const HlCliArgs *args);
int hl_cli_fit (const HlCliCommand *cmd, const HlCliArgs *args);
const HlCatalogueSet *hl_cli_catalogues (void);
void hl_cli_resolve_templates (const char *path, HlPlan *plan);

/* The image subcommand (hl-cli-image.c). */
extern const HlCliOption hl_cli_image_options[];
int hl_cli_image (const HlCliCommand *cmd, const HlCliArgs *args);

/* The bench subcommand (hl-cli-bench.c). */
int hl_cli_bench (bool quick);
