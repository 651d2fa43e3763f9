/* hl-cli-bench.c: `hiplever-cli bench`, speed figures of the core.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Seven figures, each printed with its target; none is a pass/fail test.
 * Every result is summed into a volatile so the work cannot be dropped;
 * hl_model_solve lives in another translation unit, so it cannot be hoisted
 * out of the loops either.  Random inputs come from a fixed seed.
 */
#include "config.h"

#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "hl-batch.h"
#include "hl-bench.h"
#include "hl-fit.h"
#include "hl-i18n.h"
#include "hl-plan.h"
#include "hl-plan-io.h"
#include "hl-report.h"
#include "hl-solve.h"
#include "hl-cli.h"

/* Counts: the full run and the --quick smoke test. */
#define HL_BENCH_SOLVES         10000000L
#define HL_BENCH_SOLVES_QUICK     100000L
#define HL_BENCH_WHATIFS         1000000L
#define HL_BENCH_WHATIFS_QUICK    100000L
#define HL_BENCH_FILES             10000L
#define HL_BENCH_FILES_QUICK         100L
/* Re-preparing costs far more per what-if, so a tenth of the count gives
 * a steady mean. */
#define HL_BENCH_REPREPARE_DIVISOR    10L

/* Best of this many runs of the sweep and Monte Carlo figures. */
#define HL_BENCH_ANALYSIS_REPEATS_QUICK 2

/* Targets, printed beside the figures. */
#define HL_BENCH_SOLVE_TARGET_NS   50.0
#define HL_BENCH_WHATIF_TARGET_MS  20.0
#define HL_BENCH_BATCH_TARGET_MS    8.0
#define HL_BENCH_FILES_TARGET_S     5.0

/* Random what-if inputs are drawn beforehand into a table this size (a
 * power of two) and cycled, so drawing them is not timed. */
#define HL_BENCH_TABLE_SIZE 16384u
#define HL_BENCH_SEED UINT64_C(0x2385D1CE0A17B3E5)

/* Ranges of the random what-ifs and plan variants: plausible planning
 * changes around the demo case, inside every range hl_plan_check allows. */
#define HL_BENCH_RECON_MIN_MM   (-6.0)
#define HL_BENCH_RECON_MAX_MM    10.0
#define HL_BENCH_HEAD_MIN_MM    (-4.0)
#define HL_BENCH_HEAD_MAX_MM      8.0
/* Passes of the what-if loop; the best is reported. */
#define HL_BENCH_WHATIF_PASSES 5
#define HL_BENCH_NECK_MIN_DEG   125.0
#define HL_BENCH_NECK_MAX_DEG   140.0
#define HL_BENCH_CANE_MAX_BW      0.20   /* rarely more: Brand & Crowninshield 1980 */
#define HL_BENCH_LOAD_MAX_KG     10.0
#define HL_BENCH_MASS_MIN_KG     55.0
#define HL_BENCH_MASS_MAX_KG    105.0
#define HL_BENCH_JITTER_MM        2.0

/* The invented demo aids and loads of the bench plan. */
#define HL_BENCH_CANE_PERCENT_BW 15.0
#define HL_BENCH_CANE_DISTANCE_MM 275.0
#define HL_BENCH_HAND_DISTANCE_MM 225.0
#define HL_BENCH_IPSI_LOAD_KG     4.0
#define HL_BENCH_CONTRA_LOAD_KG   2.0
#define HL_BENCH_MIDLINE_LOAD_KG  1.0
#define HL_BENCH_LATERALISED_MM   6.0
#define HL_BENCH_MEDIALISED_MM    4.0
#define HL_BENCH_LONG_HEAD_MM     3.5

/* A folder name this long at most; a path has room for it and a file name. */
#define HL_BENCH_DIR_MAX 1024
#define HL_BENCH_PATH_MAX (HL_BENCH_DIR_MAX + 64)

#define NS_PER_S  1e9
#define NS_PER_MS 1e6
#define NS_PER_US 1e3

typedef struct {
  uint64_t state;
} HlBenchRng;

/* splitmix64 (Steele, Lea & Flood 2014, OOPSLA "Fast splittable
 * pseudorandom number generators"). */
static uint64_t
rng_next (HlBenchRng *rng)
{
  uint64_t z = (rng->state += UINT64_C(0x9E3779B97F4A7C15));

  z = (z ^ (z >> 30)) * UINT64_C(0xBF58476D1CE4E5B9);
  z = (z ^ (z >> 27)) * UINT64_C(0x94D049BB133111EB);
  return z ^ (z >> 31);
}

static double
rng_uniform (HlBenchRng *rng, double lo, double hi)
{
  /* 53 random bits give a double in [0, 1). */
  double u = (double) (rng_next (rng) >> 11) * 0x1.0p-53;

  return lo + (hi - lo) * u;
}

static double
now_ns (void)
{
  struct timespec ts;

  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec * NS_PER_S + (double) ts.tv_nsec;
}

static void
random_recon (HlBenchRng *rng, HlRecon *r)
{
  hl_recon_init (r);
  r->cup_medial_mm = rng_uniform (rng, HL_BENCH_RECON_MIN_MM, HL_BENCH_RECON_MAX_MM);
  r->cup_superior_mm = rng_uniform (rng, HL_BENCH_RECON_MIN_MM, HL_BENCH_RECON_MAX_MM);
  r->femoral_offset_mm = rng_uniform (rng, HL_BENCH_RECON_MIN_MM, HL_BENCH_RECON_MAX_MM);
  r->femoral_length_mm = rng_uniform (rng, HL_BENCH_RECON_MIN_MM, HL_BENCH_RECON_MAX_MM);
  r->head_length_mm = rng_uniform (rng, HL_BENCH_HEAD_MIN_MM, HL_BENCH_HEAD_MAX_MM);
  /* Stems are specified in whole degrees of neck-shaft angle. */
  r->neck_shaft_angle_deg = floor (rng_uniform (rng, HL_BENCH_NECK_MIN_DEG,
                                                HL_BENCH_NECK_MAX_DEG + 1.0));
}

/* The demo geometry with three options, a cane and loads in both hands
 * and on the midline, so that every force of the model is exercised. */
static HlPlan *
bench_plan (void)
{
  HlPlan *plan = hl_plan_new ();
  HlRecon r;

  if (plan == NULL)
    return NULL;
  hl_plan_set_demo_landmarks (plan);
  snprintf (plan->label, sizeof plan->label, "%s", "bench (invented case)");

  plan->cane.enabled = true;
  plan->cane.hand = HL_HAND_CONTRALATERAL;
  plan->cane.unit = HL_FORCE_UNIT_PERCENT_BW;
  plan->cane.value = HL_BENCH_CANE_PERCENT_BW;
  plan->cane.distance_mm = HL_BENCH_CANE_DISTANCE_MM;
  plan->loads.hand[HL_HAND_IPSILATERAL].mass_kg = HL_BENCH_IPSI_LOAD_KG;
  plan->loads.hand[HL_HAND_IPSILATERAL].distance_mm = HL_BENCH_HAND_DISTANCE_MM;
  plan->loads.hand[HL_HAND_CONTRALATERAL].mass_kg = HL_BENCH_CONTRA_LOAD_KG;
  plan->loads.hand[HL_HAND_CONTRALATERAL].distance_mm = HL_BENCH_HAND_DISTANCE_MM;
  plan->loads.midline_kg = HL_BENCH_MIDLINE_LOAD_KG;

  hl_recon_init (&r);
  if (hl_plan_add_option (plan, "Standard stem", &r) < 0)
    goto nomem;
  r.femoral_offset_mm = HL_BENCH_LATERALISED_MM;
  if (hl_plan_add_option (plan, "Lateralised stem", &r) < 0)
    goto nomem;
  hl_recon_init (&r);
  r.cup_medial_mm = HL_BENCH_MEDIALISED_MM;
  r.head_length_mm = HL_BENCH_LONG_HEAD_MM;
  if (hl_plan_add_option (plan, "Medialised cup, long head", &r) < 0)
    goto nomem;
  return plan;

nomem:
  hl_plan_free (plan);
  return NULL;
}

static bool
prepare (HlModel *model, const HlPlan *plan)
{
  HlError err;

  hl_error_clear (&err);
  if (hl_model_prepare (model, plan, &err) != HL_OK)
    {
      hl_cli_report_error ("bench", NULL, &err);
      return false;
    }
  return true;
}

/* 1) one option, solved over and over. */
static bool
bench_solve (const HlPlan *plan, long count)
{
  HlModel model;
  HlResult res;
  volatile double sink = 0.0;
  long failed = 0;

  if (!prepare (&model, plan))
    return false;

  const HlRecon *recon = &plan->options[1].recon;
  double t0 = now_ns ();
  for (long i = 0; i < count; i++)
    {
      if (hl_model_solve (&model, recon, &res, NULL) != HL_OK)
        failed++;
      sink += res.jrf_n;
    }
  double ns = (now_ns () - t0) / (double) count;
  (void) sink;

  fprintf (stdout,
           _("1) one solve: %.1f ns per solve (mean of %ld; target <= %.0f ns)\n"),
                  ns, count, HL_BENCH_SOLVE_TARGET_NS);
  if (failed > 0)
    hl_cli_error (_("bench: %ld of %ld solves failed"), failed, count);
  return failed == 0;
}

typedef struct {
  HlRecon recon;
  double cane_n;
  double load_n[2];
  double load_midline_n;
} HlBenchWhatIf;

static void
fill_whatifs (HlBenchWhatIf *table, size_t n, double body_weight_n)
{
  HlBenchRng rng = { HL_BENCH_SEED };

  for (size_t i = 0; i < n; i++)
    {
      random_recon (&rng, &table[i].recon);
      table[i].cane_n = rng_uniform (&rng, 0.0, HL_BENCH_CANE_MAX_BW) * body_weight_n;
      for (int h = 0; h < 2; h++)
        table[i].load_n[h] = rng_uniform (&rng, 0.0, HL_BENCH_LOAD_MAX_KG) * HL_GRAVITY;
      table[i].load_midline_n = rng_uniform (&rng, 0.0, HL_BENCH_LOAD_MAX_KG) * HL_GRAVITY;
    }
}

/* The what-if table as a structure of arrays for hl_model_solve_batch(). */
enum {
  BATCH_CM, BATCH_CS, BATCH_FO, BATCH_FL, BATCH_HEAD, BATCH_NECK,
  BATCH_CANE, BATCH_LOAD0, BATCH_LOAD1, BATCH_LOAD_MID, BATCH_N_IN
};
enum {
  BATCH_ARM, BATCH_LEVER, BATCH_FA, BATCH_JX, BATCH_JY, BATCH_J, BATCH_ANGLE,
  BATCH_N_OUT
};

/* The same what-ifs as the per-solve loop (the table cycled to `count`),
 * solved in table-sized batches; the best of the passes in ms, or a
 * negative value when out of memory. */
static double
bench_batch (const HlModel *model, const HlBenchWhatIf *table, long count,
             long *refused)
{
  const size_t n = HL_BENCH_TABLE_SIZE;
  double *in = malloc (BATCH_N_IN * n * sizeof *in);
  double *out = malloc (BATCH_N_OUT * n * sizeof *out);
  volatile double sink = 0.0;
  double ms = INFINITY;

  if (in == NULL || out == NULL)
    {
      free (in);
      free (out);
      return -1.0;
    }
  for (size_t i = 0; i < n; i++)
    {
      const HlBenchWhatIf *w = &table[i];
      in[BATCH_CM * n + i] = w->recon.cup_medial_mm;
      in[BATCH_CS * n + i] = w->recon.cup_superior_mm;
      in[BATCH_FO * n + i] = w->recon.femoral_offset_mm;
      in[BATCH_FL * n + i] = w->recon.femoral_length_mm;
      in[BATCH_HEAD * n + i] = w->recon.head_length_mm;
      in[BATCH_NECK * n + i] = w->recon.neck_shaft_angle_deg;
      in[BATCH_CANE * n + i] = w->cane_n;
      in[BATCH_LOAD0 * n + i] = w->load_n[0];
      in[BATCH_LOAD1 * n + i] = w->load_n[1];
      in[BATCH_LOAD_MID * n + i] = w->load_midline_n;
    }
  const HlBatchInput bin = {
    in + BATCH_CM * n, in + BATCH_CS * n, in + BATCH_FO * n, in + BATCH_FL * n,
    in + BATCH_HEAD * n, in + BATCH_NECK * n, in + BATCH_CANE * n,
    { in + BATCH_LOAD0 * n, in + BATCH_LOAD1 * n }, in + BATCH_LOAD_MID * n,
  };
  const HlBatchOutput bout = {
    out + BATCH_ARM * n, out + BATCH_LEVER * n, out + BATCH_FA * n,
    out + BATCH_JX * n, out + BATCH_JY * n, out + BATCH_J * n,
    out + BATCH_ANGLE * n,
  };

  *refused = 0;
  for (int pass = 0; pass < HL_BENCH_WHATIF_PASSES; pass++)
    {
      long pass_refused = 0;
      double t0 = now_ns ();
      for (long done = 0; done < count; done += (long) n)
        {
          size_t chunk = count - done < (long) n ? (size_t) (count - done) : n;
          pass_refused += (long) hl_model_solve_batch (model, &bin, &bout, chunk);
          sink += bout.jrf_n[chunk - 1] + bout.jrf_angle_deg[chunk - 1];
        }
      double pass_ms = (now_ns () - t0) / NS_PER_MS;
      if (pass_ms < ms)
        ms = pass_ms;
      *refused = pass_refused;
    }
  (void) sink;
  free (in);
  free (out);
  return ms;
}

/* 2) random what-ifs: the fast way sets the prepared model's force fields
 * directly; re-preparing from the plan is timed beside it for comparison. */
static bool
bench_whatif (const HlPlan *demo, long count)
{
  HlModel base;
  HlModel model;
  HlResult res;
  volatile double sink = 0.0;
  long failed = 0;

  if (!prepare (&base, demo))
    return false;

  HlBenchWhatIf *table = malloc (HL_BENCH_TABLE_SIZE * sizeof *table);
  HlPlan *plan = hl_plan_copy (demo);
  if (table == NULL || plan == NULL)
    {
      hl_cli_error (_("bench: out of memory"));
      free (table);
      if (plan != NULL)
        hl_plan_free (plan);
      return false;
    }
  fill_whatifs (table, HL_BENCH_TABLE_SIZE, base.body_weight_n);

  /* Best of a few passes: the shortest is the one least disturbed by
   * other work on the machine. */
  double ms = INFINITY;
  for (int pass = 0; pass < HL_BENCH_WHATIF_PASSES; pass++)
    {
      model = base;
      double t0 = now_ns ();
      for (long i = 0; i < count; i++)
        {
          const HlBenchWhatIf *w = &table[(size_t) i & (HL_BENCH_TABLE_SIZE - 1)];

          model.cane_n = w->cane_n;
          model.load_n[0] = w->load_n[0];
          model.load_n[1] = w->load_n[1];
          model.load_midline_n = w->load_midline_n;
          if (hl_model_solve (&model, &w->recon, &res, NULL) != HL_OK)
            failed++;
          sink += res.jrf_n;
        }
      double pass_ms = (now_ns () - t0) / NS_PER_MS;
      if (pass_ms < ms)
        ms = pass_ms;
    }

  fprintf (stdout,
           _("2) what-if solves: %.2f ms for %ld random what-ifs on one core, "
             "cane and loads set on the prepared model, best of %d (target <= %.0f ms "
             "for %ld)\n"),
                  ms, count, HL_BENCH_WHATIF_PASSES, HL_BENCH_WHATIF_TARGET_MS, HL_BENCH_WHATIFS);

  long refused = 0;
  double batch_ms = bench_batch (&base, table, count, &refused);
  if (batch_ms < 0.0)
    {
      hl_cli_error (_("bench: out of memory"));
      free (table);
      hl_plan_free (plan);
      return false;
    }
  failed += refused;
  fprintf (stdout,
           _("batch what-ifs: %.2f ms for the same %ld what-ifs on one core, "
             "structure of arrays with the joint force angle, best of %d "
             "(target <= %.0f ms for %ld)\n"),
           batch_ms, count, HL_BENCH_WHATIF_PASSES, HL_BENCH_BATCH_TARGET_MS,
           HL_BENCH_WHATIFS);

  long slow_count = count / HL_BENCH_REPREPARE_DIVISOR;
  plan->cane.unit = HL_FORCE_UNIT_N;
  double t0 = now_ns ();
  for (long i = 0; i < slow_count; i++)
    {
      const HlBenchWhatIf *w = &table[(size_t) i & (HL_BENCH_TABLE_SIZE - 1)];

      plan->cane.value = w->cane_n;
      plan->loads.hand[0].mass_kg = w->load_n[0] / HL_GRAVITY;
      plan->loads.hand[1].mass_kg = w->load_n[1] / HL_GRAVITY;
      plan->loads.midline_kg = w->load_midline_n / HL_GRAVITY;
      if (hl_model_prepare (&model, plan, NULL) != HL_OK
          || hl_model_solve (&model, &w->recon, &res, NULL) != HL_OK)
        failed++;
      sink += res.jrf_n;
    }
  double us = (now_ns () - t0) / NS_PER_US / (double) (slow_count > 0 ? slow_count : 1);
  (void) sink;

  fprintf (stdout,
           _("   re-preparing the model for each what-if instead: %.3f us per "
             "what-if (mean of %ld)\n"), us, slow_count);
  free (table);
  hl_plan_free (plan);
  if (failed > 0)
    hl_cli_error (_("bench: %ld what-if solves failed"), failed);
  return failed == 0;
}

static void
jitter_plan (HlPlan *plan, HlBenchRng *rng)
{
  plan->mass_kg = rng_uniform (rng, HL_BENCH_MASS_MIN_KG, HL_BENCH_MASS_MAX_KG);
  plan->cane.value = rng_uniform (rng, 0.0, HL_BENCH_CANE_MAX_BW * 100.0);
  for (int id = 0; id < HL_LM_COUNT; id++)
    {
      if (!hl_landmarks_has (&plan->landmarks, (HlLandmarkId) id))
        continue;
      plan->landmarks.p[id].x += rng_uniform (rng, -HL_BENCH_JITTER_MM, HL_BENCH_JITTER_MM);
      plan->landmarks.p[id].y += rng_uniform (rng, -HL_BENCH_JITTER_MM, HL_BENCH_JITTER_MM);
    }
  for (size_t i = 0; i < plan->n_options; i++)
    random_recon (rng, &plan->options[i].recon);
}

static void
plan_path (char *path, const char *dir, long i)
{
  snprintf (path, HL_BENCH_PATH_MAX, "%s/plan-%05ld%s", dir, i,
            HL_PLAN_FILE_EXTENSION);
}

static void
remove_files (const char *dir, long count)
{
  char path[HL_BENCH_PATH_MAX];

  for (long i = 0; i < count; i++)
    {
      plan_path (path, dir, i);
      unlink (path);
    }
  rmdir (dir);
}

/* 3) load, validate and solve plan files; writing them is not timed. */
static bool
bench_files (const HlPlan *demo, long count)
{
  const char *tmp = getenv ("TMPDIR");
  char dir[HL_BENCH_DIR_MAX];
  char path[HL_BENCH_PATH_MAX];
  HlBenchRng rng = { HL_BENCH_SEED };
  HlError err;
  long written = 0;
  bool ok = true;

  if (tmp == NULL || tmp[0] == '\0')
    tmp = "/tmp";
  int n = snprintf (dir, sizeof dir, "%s/hiplever-bench-XXXXXX", tmp);
  if (n < 0 || (size_t) n >= sizeof dir)
    {
      hl_cli_error (_("bench: the temporary folder name %s is too long"), tmp);
      return false;
    }
  if (mkdtemp (dir) == NULL)
    {
      hl_cli_error (_("bench: cannot create a folder in %s: %s"), tmp,
                    strerror (errno));
      return false;
    }

  HlPlan *plan = hl_plan_copy (demo);
  if (plan == NULL)
    {
      hl_cli_error (_("bench: out of memory"));
      rmdir (dir);
      return false;
    }
  for (; written < count && ok; written++)
    {
      hl_plan_assign (plan, demo);
      jitter_plan (plan, &rng);
      plan_path (path, dir, written);
      hl_error_clear (&err);
      if (hl_plan_save_file (plan, path, &err) != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          ok = false;
        }
    }
  hl_plan_free (plan);

  volatile double sink = 0.0;
  double t0 = now_ns ();
  for (long i = 0; i < count && ok; i++)
    {
      HlPlan *p = NULL;
      HlModel model;
      HlResult res;

      plan_path (path, dir, i);
      hl_error_clear (&err);
      if (hl_plan_load_file (path, &p, &err) != HL_OK
          || hl_model_prepare (&model, p, &err) != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          ok = false;
        }
      for (size_t k = 0; ok && k <= p->n_options; k++)
        {
          if (hl_model_solve (&model, k == 0 ? NULL : &p->options[k - 1].recon,
                              &res, &err) != HL_OK)
            {
              hl_cli_report_error (path, NULL, &err);
              ok = false;
            }
          sink += res.jrf_n;
        }
      if (p != NULL)
        hl_plan_free (p);
    }
  double s = (now_ns () - t0) / NS_PER_S;
  (void) sink;

  remove_files (dir, written);
  if (!ok)
    return false;

  fprintf (stdout,
           _("3) plan files: %.3f s to load, validate and solve %ld files "
             "(target <= %.0f s for %ld)\n"),
                  s, count, HL_BENCH_FILES_TARGET_S, HL_BENCH_FILES);
  return true;
}

/* 4) and 5): the analysis hot paths, timed by the core (hl-bench.h). */
static bool
bench_analysis (bool quick)
{
  HlPlan *plan = hl_bench_demo_plan ();
  HlBenchResult res;
  HlError err;

  if (plan == NULL)
    {
      hl_cli_error (_("bench: out of memory"));
      return false;
    }
  hl_error_clear (&err);
  HlStatus st = hl_bench_analysis (plan, quick ? HL_BENCH_ANALYSIS_REPEATS_QUICK
                                               : HL_BENCH_REPEATS_DEFAULT,
                                   &res, &err);
  hl_plan_free (plan);
  if (st != HL_OK)
    {
      hl_cli_report_error ("bench", NULL, &err);
      return false;
    }
  fprintf (stdout,
           _("4) sweep: %.3f ms for %zu points of native and %zu options, "
             "best of %d (target <= %.1f ms)\n"),
                  res.sweep_ms, res.sweep_steps, res.n_options, res.repeats,
                  HL_BENCH_SWEEP_TARGET_MS);
  fprintf (stdout,
           _("5) Monte Carlo: %.3f ms for %zu samples of native and %zu "
             "options, best of %d (target <= %.1f ms)\n"),
                  res.mc_ms, res.mc_samples, res.n_options, res.repeats,
                  HL_BENCH_MC_TARGET_MS);
  return true;
}

/* 6): the PDF report (Monte Carlo, inverse answers, chart sweeps, drawing),
 * best of a few runs, in memory. */
#define HL_BENCH_REPORT_TARGET_S 1.0
#define HL_BENCH_REPORT_REPEATS 3
#define HL_BENCH_REPORT_REPEATS_QUICK 1

static bool
bench_report (bool quick)
{
  HlPlan *plan = hl_bench_demo_plan ();
  int repeats = quick ? HL_BENCH_REPORT_REPEATS_QUICK : HL_BENCH_REPORT_REPEATS;
  double best = INFINITY;
  int pages = 0;
  HlError err;

  if (plan == NULL)
    {
      hl_cli_error (_("bench: out of memory"));
      return false;
    }
  for (int i = 0; i < repeats; i++)
    {
      unsigned char *pdf = NULL;
      size_t size = 0;
      hl_error_clear (&err);
      double t0 = now_ns ();
      HlReport *report = hl_report_new (plan, NULL, &err);
      HlStatus st = report != NULL ? hl_report_pdf_to_buffer (report, &pdf, &size, &err)
                                   : err.status;
      double t = (now_ns () - t0) / NS_PER_S;
      if (report != NULL)
        pages = hl_report_n_pages (report);
      hl_report_free (report);
      free (pdf);
      if (st != HL_OK)
        {
          hl_cli_report_error ("bench", NULL, &err);
          hl_plan_free (plan);
          return false;
        }
      best = t < best ? t : best;
    }
  fprintf (stdout,
           _("6) report: %.3f s for a %d-page PDF of native and %zu options, "
             "best of %d (target <= %.1f s)\n"),
                  best, pages, plan->n_options, repeats, HL_BENCH_REPORT_TARGET_S);
  hl_plan_free (plan);
  return true;
}

/* 7) the ranking of implant combinations: fit --sizes on the demo plan
 * file with its own Monte Carlo settings (issue target 100 ms). */
#define HL_BENCH_FIT_TARGET_MS 100.0
#define HL_BENCH_FIT_REPEATS 5
#define HL_BENCH_FIT_REPEATS_QUICK 1

static bool
bench_fit (bool quick)
{
  static const char *const dirs[] = { HL_SOURCE_DATADIR, HL_PKGDATADIR };
  HlPlan *plan = NULL;
  HlError err;
  char path[HL_BENCH_PATH_MAX];

  for (size_t i = 0; i < sizeof dirs / sizeof dirs[0] && plan == NULL; i++)
    {
      snprintf (path, sizeof path, "%s/examples/demo.hlplan", dirs[i]);
      if (access (path, R_OK) == 0 && hl_plan_load_file (path, &plan, &err) != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          return false;
        }
    }
  if (plan == NULL)
    {
      hl_cli_error (_("bench: the demo plan (examples/demo.hlplan) is not installed"));
      return false;
    }
  hl_cli_resolve_templates (path, plan);
  long option = hl_fit_first_templated (plan);
  const HlCatalogue *cat = option < 0 ? NULL
    : hl_catalogue_set_find (hl_cli_catalogues (), plan->options[option].recon.tmpl.catalogue);
  if (cat == NULL)
    {
      hl_cli_error (_("bench: the demo plan has no templated option with its catalogue"));
      hl_plan_free (plan);
      return false;
    }
  int repeats = quick ? HL_BENCH_FIT_REPEATS_QUICK : HL_BENCH_FIT_REPEATS;
  double best = INFINITY, best_cpu = INFINITY;
  size_t rows = 0, samples = 0;
  for (int i = 0; i < repeats; i++)
    {
      HlFitTable table;
      struct timespec c0, c1;
      hl_error_clear (&err);
      clock_gettime (CLOCK_PROCESS_CPUTIME_ID, &c0);
      double t0 = now_ns ();
      HlStatus st = hl_fit_rank (plan, (size_t) option, cat, HL_FIT_SIZES, &table, &err);
      double t = (now_ns () - t0) / NS_PER_MS;
      clock_gettime (CLOCK_PROCESS_CPUTIME_ID, &c1);
      double cpu = ((double) (c1.tv_sec - c0.tv_sec) * NS_PER_S
                    + (double) (c1.tv_nsec - c0.tv_nsec)) / NS_PER_MS;
      best_cpu = cpu < best_cpu ? cpu : best_cpu;
      if (st != HL_OK)
        {
          hl_cli_report_error (path, NULL, &err);
          hl_plan_free (plan);
          return false;
        }
      rows = table.n;
      samples = table.mc_samples_used;
      hl_fit_table_clear (&table);
      best = t < best ? t : best;
    }
  fprintf (stdout,
           _("7) fit --sizes on the demo plan: %.1f ms (CPU %.1f ms) for %zu "
             "combinations ranked, each with a %zu-sample Monte Carlo, best "
             "of %d (target <= %.0f ms)\n"),
                  best, best_cpu, rows, samples, repeats, HL_BENCH_FIT_TARGET_MS);
  hl_plan_free (plan);
  return true;
}

int
hl_cli_bench (bool quick)
{
  HlPlan *plan = bench_plan ();

  if (plan == NULL)
    {
      hl_cli_error (_("bench: out of memory"));
      return HL_CLI_EXIT_INVALID;
    }

  if (quick)
    fprintf (stdout, "%s\n",
             _("Quick run: reduced counts, a smoke test; the targets "
               "are for the full counts."));
  /* Flushed line by line, so a long run shows each figure as it comes. */
  fflush (stdout);

  bool ok = bench_solve (plan, quick ? HL_BENCH_SOLVES_QUICK : HL_BENCH_SOLVES);
  fflush (stdout);
  ok = ok && bench_whatif (plan, quick ? HL_BENCH_WHATIFS_QUICK : HL_BENCH_WHATIFS);
  fflush (stdout);
  ok = ok && bench_files (plan, quick ? HL_BENCH_FILES_QUICK : HL_BENCH_FILES);
  fflush (stdout);
  ok = ok && bench_analysis (quick);
  fflush (stdout);
  ok = ok && bench_report (quick);
  fflush (stdout);
  ok = ok && bench_fit (quick);

  hl_plan_free (plan);
  return ok ? HL_CLI_EXIT_OK : HL_CLI_EXIT_INVALID;
}
