/* hl-bench.h: timing of the analysis hot paths (for `bench` commands).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Not a test: timings depend on the machine.  The targets are a
 * 200-point sweep for four options in at most 0.2 ms and 4,000 Monte Carlo
 * samples for four options in at most 2 ms on one core, so that charts and
 * ranges follow a drag live.
 */
#pragma once

#include "hl-plan.h"

#ifdef __cplusplus
extern "C" {
#endif

#define HL_BENCH_SWEEP_TARGET_MS 0.2
#define HL_BENCH_MC_TARGET_MS 2.0
#define HL_BENCH_SWEEP_STEPS 200
#define HL_BENCH_REPEATS_DEFAULT 20

typedef struct {
  size_t n_options;
  size_t sweep_steps;
  size_t mc_samples;
  double sweep_ms;        /* best of the repeats, femoral offset sweep */
  double mc_ms;           /* best of the repeats, default error settings */
  int repeats;
} HlBenchResult;

/* Times a femoral-offset sweep of HL_BENCH_SWEEP_STEPS points and a Monte
 * Carlo of HL_MC_SAMPLES_DEFAULT samples for native and every option of
 * `plan`, best of `repeats` runs. */
HlStatus hl_bench_analysis (const HlPlan *plan, int repeats,
                            HlBenchResult *out, HlError *err);

/* A demo plan with four invented options, for benchmarks; NULL when out
 * of memory. */
HlPlan *hl_bench_demo_plan (void);

#ifdef __cplusplus
}
#endif
