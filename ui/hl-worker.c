/* hl-worker.c: the window's worker threads (hl-worker.h).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>

#ifdef __linux__
#include <sys/resource.h>
#include <sys/syscall.h>
#include <unistd.h>
#endif

#include "hl-worker.h"

void
hl_worker_lower_priority (void)
{
#ifdef __linux__
  id_t tid = (id_t) syscall (SYS_gettid);
  errno = 0;
  int now = getpriority (PRIO_PROCESS, tid);
  if (errno == 0 && now < HL_WORKER_NICE)
    (void) setpriority (PRIO_PROCESS, tid, HL_WORKER_NICE);
#endif
}
