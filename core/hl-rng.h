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
 * time; the spare is kept in the state.  The fast path for Monte Carlo is
 * the ziggurat method (Marsaglia & Tsang 2000, "The ziggurat method for
 * generating random variables", J Stat Softw 5(8)) in Doornik's form with
 * 128 blocks and independent bits for the block (Doornik 2005, "An
 * improved ziggurat method to generate normal random samples", technical
 * report, University of Oxford); its table
 * is caller-owned too, built once.
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
/* Standard normal deviate (mean 0, SD 1), polar method. */
double hl_rng_normal (HlRng *rng);

#define HL_ZIGGURAT_BLOCKS 128

typedef struct {
  double x[HL_ZIGGURAT_BLOCKS + 1];   /* block edges */
  double ratio[HL_ZIGGURAT_BLOCKS];   /* x[i + 1] / x[i] */
} HlNormalTable;

void hl_normal_table_init (HlNormalTable *table);
/* Standard normal deviate by the ziggurat method. */
double hl_rng_normal_zig (HlRng *rng, const HlNormalTable *table);

#ifdef __cplusplus
}
#endif
