/* hl-fault-alloc.c: a preloaded shim that makes the Nth allocation fail,
 * for the allocation-failure tests (tests/test-alloc-fault.c).  Never
 * linked into the programs.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * LD_PRELOAD=libhl-fault-alloc.so replaces malloc, calloc, realloc and
 * free (passing them on to glibc's own).  A test calls, found with dlsym:
 *   hl_fault_alloc_arm (n)   count allocations from now on; the nth fails
 *                            (returns NULL with ENOMEM), the others pass;
 *                            n = 0 counts without failing
 *   hl_fault_alloc_disarm () stop; returns the number counted
 *   hl_fault_alloc_live ()   blocks allocated and not yet freed, counted
 *                            since the shim loaded: equal before and after
 *                            an operation means it leaked nothing
 *   hl_fault_alloc_failed () true when the armed failure happened
 * HL_FAULT_ALLOC_SPARE=libcairo,libpng16 spares those libraries' own
 * allocations as well (their names' beginnings, read at each arm).
 * HL_FAULT_ALLOC_AFTER=N in the environment arms it at the first
 * allocation, for trying a program by hand.
 *
 * GLib aborts by design when its allocator fails (g_malloc), so
 * allocations made from inside libglib are counted in the live blocks but
 * never failed.  Everything else is, unless spared by
 * HL_FAULT_ALLOC_SPARE (below).
 */
#define _GNU_SOURCE
#include <dlfcn.h>
#include <errno.h>
#include <execinfo.h>
#include <link.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

extern void *__libc_malloc (size_t size);
extern void *__libc_calloc (size_t n, size_t size);
extern void *__libc_realloc (void *p, size_t size);
extern void __libc_free (void *p);
extern void *__libc_memalign (size_t align, size_t size);

/* Threads (the Monte Carlo) allocate too: the counters are atomic. */
static long armed_at;        /* 0: not failing */
static long counted;
static int counting;
static int failed;
static long live;
#define ADD(v, n) __atomic_add_fetch (&(v), (n), __ATOMIC_SEQ_CST)
static int env_checked;
static uintptr_t glib_lo, glib_hi;
/* HL_FAULT_ALLOC_SPARE=LIB,LIB: libraries whose own allocations are not
 * failed either (read at each arm). */
#define SPARE_MAX 32
static struct { uintptr_t lo, hi; } spare[SPARE_MAX];
static int n_spare;
static int tracing = -1;

void hl_fault_alloc_arm (long n);
long hl_fault_alloc_disarm (void);
long hl_fault_alloc_live (void);
int hl_fault_alloc_failed (void);

static int
find_spared (struct dl_phdr_info *info, size_t size, void *data)
{
  (void) size;
  const char *list = data;
  if (info->dlpi_name == NULL || info->dlpi_name[0] == '\0' || n_spare >= SPARE_MAX)
    return 0;
  const char *base = strrchr (info->dlpi_name, '/');
  base = base != NULL ? base + 1 : info->dlpi_name;
  int match = 0;
  for (const char *p = list; *p != '\0';)
    {
      size_t len = strcspn (p, ",");
      if (len > 0 && strncmp (base, p, len) == 0)
        match = 1;
      p += len + (p[len] == ',');
    }
  if (!match)
    return 0;
  for (int i = 0; i < info->dlpi_phnum; i++)
    {
      const ElfW (Phdr) *ph = &info->dlpi_phdr[i];
      if (ph->p_type != PT_LOAD || !(ph->p_flags & PF_X) || n_spare >= SPARE_MAX)
        continue;
      spare[n_spare].lo = info->dlpi_addr + ph->p_vaddr;
      spare[n_spare].hi = spare[n_spare].lo + ph->p_memsz;
      n_spare++;
    }
  return 0;
}

/* The code of the libraries whose allocations are treated apart. */
static int
find_libraries (struct dl_phdr_info *info, size_t size, void *data)
{
  (void) size;
  (void) data;
  uintptr_t *lo_p, *hi_p;
  if (info->dlpi_name != NULL && strstr (info->dlpi_name, "libglib-2.0") != NULL)
    lo_p = &glib_lo, hi_p = &glib_hi;
  else
    return 0;
  for (int i = 0; i < info->dlpi_phnum; i++)
    {
      const ElfW (Phdr) *ph = &info->dlpi_phdr[i];
      if (ph->p_type != PT_LOAD || !(ph->p_flags & PF_X))
        continue;
      uintptr_t lo = info->dlpi_addr + ph->p_vaddr;
      uintptr_t hi = lo + ph->p_memsz;
      if (*lo_p == 0 || lo < *lo_p)
        *lo_p = lo;
      if (hi > *hi_p)
        *hi_p = hi;
    }
  return 0;
}


void
hl_fault_alloc_arm (long n)
{
  if (tracing < 0)
    {
      const char *t = getenv ("HL_FAULT_ALLOC_TRACE");
      tracing = t != NULL && *t == '1';
    }
  if (glib_lo == 0)
    {
      dl_iterate_phdr (find_libraries, NULL);
      void *warm[2];
      backtrace (warm, 2);   /* loads what backtrace needs, before any fault */
    }
  n_spare = 0;
  const char *list = getenv ("HL_FAULT_ALLOC_SPARE");
  if (list != NULL && *list != '\0')
    dl_iterate_phdr (find_spared, (void *) list);
  armed_at = n;
  counted = 0;
  failed = 0;
  counting = 1;
}

/* HL_FAULT_ALLOC_TRACE=1: the blocks allocated while armed and not freed
 * are printed on disarm with their callers, to find a leak. */
#define TRACE_SLOTS 8192
static struct { void *p; void *caller; } trace[TRACE_SLOTS];

static void
trace_add (void *p, void *caller)
{
  if (tracing <= 0 || !counting)
    return;
  for (int i = 0; i < TRACE_SLOTS; i++)
    if (trace[i].p == NULL)
      {
        trace[i].p = p;
        trace[i].caller = caller;
        return;
      }
}

static void
trace_remove (void *p)
{
  if (tracing <= 0)
    return;
  for (int i = 0; i < TRACE_SLOTS; i++)
    if (trace[i].p == p)
      {
        trace[i].p = NULL;
        return;
      }
}

long
hl_fault_alloc_disarm (void)
{
  if (tracing > 0)
    for (int i = 0; i < TRACE_SLOTS; i++)
      if (trace[i].p != NULL)
        {
          Dl_info info;
          if (dladdr (trace[i].caller, &info) != 0)
            fprintf (stderr, "hl-fault-alloc: not freed: %p from %s (%s+%#lx)\n",
                     trace[i].p, info.dli_fname ? info.dli_fname : "?",
                     info.dli_sname ? info.dli_sname : "?",
                     (unsigned long) ((char *) trace[i].caller
                                      - (char *) (info.dli_saddr ? info.dli_saddr
                                                                 : info.dli_fbase)));
          trace[i].p = NULL;
        }
  counting = 0;
  armed_at = 0;
  return counted;
}

long
hl_fault_alloc_live (void)
{
  return __atomic_load_n (&live, __ATOMIC_SEQ_CST);
}

int
hl_fault_alloc_failed (void)
{
  return failed;
}

/* True when this allocation is to fail. */
static int
should_fail (void *caller)
{
  if (!env_checked)
    {
      env_checked = 1;
      const char *after = getenv ("HL_FAULT_ALLOC_AFTER");
      if (after != NULL && *after != '\0')
        hl_fault_alloc_arm (strtol (after, NULL, 10));
    }
  if (!counting)
    return 0;
  uintptr_t c = (uintptr_t) caller;
  if (c >= glib_lo && c < glib_hi)
    return 0;
  for (int i = 0; i < n_spare; i++)
    if (c >= spare[i].lo && c < spare[i].hi)
      return 0;
  long k = ADD (counted, 1);
  if (armed_at > 0 && k == armed_at)
    {
      if (tracing > 0)
        {
          void *frames[16];
          int n = backtrace (frames, 16);
          fprintf (stderr, "hl-fault-alloc: allocation %ld fails here:\n", k);
          backtrace_symbols_fd (frames, n, 2);
        }
      failed = 1;
      errno = ENOMEM;
      return 1;
    }
  return 0;
}

void *
malloc (size_t size)
{
  if (should_fail (__builtin_return_address (0)))
    return NULL;
  void *p = __libc_malloc (size);
  if (p != NULL)
    {
      ADD (live, 1);
      trace_add (p, __builtin_return_address (0));
    }
  return p;
}

void *
calloc (size_t n, size_t size)
{
  if (should_fail (__builtin_return_address (0)))
    return NULL;
  void *p = __libc_calloc (n, size);
  if (p != NULL)
    {
      ADD (live, 1);
      trace_add (p, __builtin_return_address (0));
    }
  return p;
}

void *
realloc (void *old, size_t size)
{
  if (old != NULL && size == 0)
    {
      __libc_free (old);
      ADD (live, -1);
      return NULL;
    }
  if (should_fail (__builtin_return_address (0)))
    return NULL;
  void *p = __libc_realloc (old, size);
  if (p != NULL && old == NULL)
    ADD (live, 1);
  if (p != NULL)
    {
      trace_remove (old);
      trace_add (p, __builtin_return_address (0));
    }
  return p;
}

void
free (void *p)
{
  if (p != NULL)
    {
      ADD (live, -1);
      trace_remove (p);
    }
  __libc_free (p);
}

int
posix_memalign (void **out, size_t align, size_t size)
{
  if (should_fail (__builtin_return_address (0)))
    return ENOMEM;
  void *p = __libc_memalign (align, size);
  if (p == NULL)
    return ENOMEM;
  ADD (live, 1);
  *out = p;
  return 0;
}

void *
aligned_alloc (size_t align, size_t size)
{
  if (should_fail (__builtin_return_address (0)))
    return NULL;
  void *p = __libc_memalign (align, size);
  if (p != NULL)
    ADD (live, 1);
  return p;
}

void *memalign (size_t align, size_t size);
void *
memalign (size_t align, size_t size)
{
  return aligned_alloc (align, size);
}
