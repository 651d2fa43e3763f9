/* hl-worker.h: the window's worker threads.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

/* The nice value of the window's worker threads. */
#define HL_WORKER_NICE 10

/* Called first in every GTask thread function of the window (ranges,
 * charts, ranking, image loading): the calling worker thread gets the
 * nice value HL_WORKER_NICE, so that on a machine with few cores the
 * main thread (a drag's frames) wins the processor over the analysis it
 * started.  Linux only (the nice value is per thread there); a no-op
 * elsewhere and when the thread is already as nice. */
void hl_worker_lower_priority (void);
