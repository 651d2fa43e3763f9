/* hl-rng.h: a small, fast, re-entrant pseudo-random number generator.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * xoshiro256** (Blackman & Vigna 2021, "Scrambled linear pseudorandom
 * number generators", ACM Trans Math Softw 47:36), its 256-bit state
 * seeded from one 64-bit seed by splitmix64 (Steele, Lea & Flood 2014,
 * "Fast splittable pseudorandom number generators", OOPSLA), as its
 * authors recommend.  Normal deviates by Marsaglia's polar method
 * (Marsaglia & Bray 1964, SIAM Review 6:260-264), which makes two at a
 * time; the spare is kept in the state.
 *
 * The state is caller-owned: the same seed gives the same sequence,
 * bit for bit, on every run and in every thread.
 */
#pragma once

#include <stdbool.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
  uint64_t s[4];
  double spare;
  bool has_spare;
} HlRng;

void hl_rng_seed (HlRng *rng, uint64_t seed);
uint64_t hl_rng_next (HlRng *rng);
/* Uniform on [0, 1), 53 random bits. */
double hl_rng_uniform (HlRng *rng);
/* Standard normal deviate (mean 0, SD 1). */
double hl_rng_normal (HlRng *rng);

#ifdef __cplusplus
}
#endif
