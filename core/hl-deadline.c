/* hl-deadline.c: a time budget for the calling thread.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <time.h>

#include "hl-deadline.h"
#include "hl-i18n.h"

static _Thread_local struct {
  bool on;
  double start, end, seconds;   /* CLOCK_MONOTONIC, s */
} budget;

static double
now_seconds (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

void
hl_deadline_begin (double seconds)
{
  budget.on = isfinite (seconds) && seconds > 0.0;
  budget.start = now_seconds ();
  budget.seconds = budget.on ? seconds : 0.0;
  budget.end = budget.start + budget.seconds;
}

void
hl_deadline_end (void)
{
  budget.on = false;
}

bool
hl_deadline_passed (void)
{
  return budget.on && now_seconds () > budget.end;
}

double
hl_deadline_elapsed (void)
{
  return budget.on ? now_seconds () - budget.start : 0.0;
}

HlStatus
hl_deadline_error (HlError *err, const char *what)
{
  return hl_error_set (err, HL_ERR_INVALID, "time budget",
                       _("%s took %.2f s, over the time budget of %g s"), what,
                       hl_deadline_elapsed (), budget.seconds);
}
