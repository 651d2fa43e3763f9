/* hl-deadline.h: a time budget for the calling thread.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The core's long loops check it as they go: the Monte Carlo samples
 * (hl_mc_run, and so the uncertainty ranges and the fit ranking), the
 * sweep's steps, solving a plan's rows in a batch and hashing a file.
 * When it has run out they stop within a few hundred solves and return
 * HL_ERR_INVALID with the message of hl_deadline_error().  A thread that
 * set none is never stopped: the check then costs one thread-local load.
 * The command line's batch gives each plan one (HL_CLI_BATCH_PLAN_SECONDS).
 */
#pragma once

#include <stdbool.h>

#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The calling thread's budget: `seconds` from now (a positive finite
 * number; anything else sets none).  Replaces an earlier one. */
void hl_deadline_begin (double seconds);
/* The calling thread has no budget any more. */
void hl_deadline_end (void);
/* True when the calling thread's budget has run out. */
bool hl_deadline_passed (void);
/* Seconds since hl_deadline_begin (0 without a budget). */
double hl_deadline_elapsed (void);
/* Fills err: "... took %.2f s, over the time budget of %g s"; returns
 * HL_ERR_INVALID. */
HlStatus hl_deadline_error (HlError *err, const char *what);

#ifdef __cplusplus
}
#endif
