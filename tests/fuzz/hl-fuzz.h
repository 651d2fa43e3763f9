/* hl-fuzz.h: what the fuzz targets share with their replay driver.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Each target defines LLVMFuzzerTestOneInput.  Built with clang's
 * -fsanitize=fuzzer it is driven by libFuzzer (tests/fuzz/run-fuzz.sh);
 * built with the normal compiler and hl-fuzz-replay.c it replays the seed
 * corpus and every kept regression input as an ordinary test.
 */
#pragma once

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

int LLVMFuzzerTestOneInput (const uint8_t *data, size_t size);

/* A broken property is a crash for libFuzzer: it keeps the input. */
#define HL_FUZZ_CHECK(cond, ...)                                          \
  do {                                                                    \
    if (!(cond))                                                          \
      {                                                                   \
        fprintf (stderr, "%s:%d: property broken: %s: ", __FILE__,        \
                 __LINE__, #cond);                                        \
        fprintf (stderr, __VA_ARGS__);                                    \
        fputc ('\n', stderr);                                             \
        abort ();                                                         \
      }                                                                   \
  } while (0)
