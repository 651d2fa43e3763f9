/* hl-rng.c: xoshiro256** with splitmix64 seeding; polar-method normals.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include "hl-rng.h"

/* 2^-53: maps the top 53 bits of a 64-bit word onto [0, 1). */
#define HL_RNG_DOUBLE_UNIT 0x1.0p-53

static inline uint64_t
rotl (uint64_t x, int k)
{
  return (x << k) | (x >> (64 - k));
}

static uint64_t
splitmix64 (uint64_t *x)
{
  uint64_t z = (*x += UINT64_C (0x9e3779b97f4a7c15));
  z = (z ^ (z >> 30)) * UINT64_C (0xbf58476d1ce4e5b9);
  z = (z ^ (z >> 27)) * UINT64_C (0x94d049bb133111eb);
  return z ^ (z >> 31);
}

void
hl_rng_seed (HlRng *rng, uint64_t seed)
{
  uint64_t x = seed;
  for (int i = 0; i < 4; i++)
    rng->s[i] = splitmix64 (&x);
  rng->spare = 0.0;
  rng->has_spare = false;
}

uint64_t
hl_rng_next (HlRng *rng)
{
  uint64_t *s = rng->s;
  const uint64_t result = rotl (s[1] * 5, 7) * 9;
  const uint64_t t = s[1] << 17;

  s[2] ^= s[0];
  s[3] ^= s[1];
  s[1] ^= s[2];
  s[0] ^= s[3];
  s[2] ^= t;
  s[3] = rotl (s[3], 45);
  return result;
}

double
hl_rng_uniform (HlRng *rng)
{
  return (double) (hl_rng_next (rng) >> 11) * HL_RNG_DOUBLE_UNIT;
}

double
hl_rng_normal (HlRng *rng)
{
  if (rng->has_spare)
    {
      rng->has_spare = false;
      return rng->spare;
    }

  double u, v, r2;
  do
    {
      u = 2.0 * hl_rng_uniform (rng) - 1.0;
      v = 2.0 * hl_rng_uniform (rng) - 1.0;
      r2 = u * u + v * v;
    }
  while (r2 >= 1.0 || r2 == 0.0);

  double scale = sqrt (-2.0 * log (r2) / r2);
  rng->spare = v * scale;
  rng->has_spare = true;
  return u * scale;
}

/* The 128-block ziggurat: the start of the tail R and the area V of each
 * block (Marsaglia & Tsang 2000). */
#define HL_ZIGGURAT_R 3.442619855899
#define HL_ZIGGURAT_V 9.91256303526217e-3

void
hl_normal_table_init (HlNormalTable *t)
{
  double f = exp (-0.5 * HL_ZIGGURAT_R * HL_ZIGGURAT_R);

  t->x[0] = HL_ZIGGURAT_V / f;   /* the base block, tail included */
  t->x[1] = HL_ZIGGURAT_R;
  t->x[HL_ZIGGURAT_BLOCKS] = 0.0;
  for (int i = 2; i < HL_ZIGGURAT_BLOCKS; i++)
    {
      t->x[i] = sqrt (-2.0 * log (HL_ZIGGURAT_V / t->x[i - 1] + f));
      f = exp (-0.5 * t->x[i] * t->x[i]);
    }
  for (int i = 0; i < HL_ZIGGURAT_BLOCKS; i++)
    t->ratio[i] = t->x[i + 1] / t->x[i];
}

/* Uniform on (0, 1]: safe under log. */
static inline double
uniform_open0 (HlRng *rng)
{
  return ((double) (hl_rng_next (rng) >> 11) + 1.0) * HL_RNG_DOUBLE_UNIT;
}

static double
normal_tail (HlRng *rng, double r, bool negative)
{
  double x, y;
  do
    {
      x = log (uniform_open0 (rng)) / r;
      y = log (uniform_open0 (rng));
    }
  while (-2.0 * y < x * x);
  return negative ? x - r : r - x;
}

double
hl_rng_normal_zig (HlRng *rng, const HlNormalTable *t)
{
  for (;;)
    {
      const uint64_t bits = hl_rng_next (rng);
      const double u = 2.0 * ((double) (bits >> 11) * HL_RNG_DOUBLE_UNIT) - 1.0;
      const unsigned i = (unsigned) (bits & (HL_ZIGGURAT_BLOCKS - 1));

      if (fabs (u) < t->ratio[i])
        return u * t->x[i];
      if (i == 0)
        return normal_tail (rng, HL_ZIGGURAT_R, u < 0.0);

      const double x = u * t->x[i];
      const double f0 = exp (-0.5 * (t->x[i] * t->x[i] - x * x));
      const double f1 = exp (-0.5 * (t->x[i + 1] * t->x[i + 1] - x * x));
      if (f1 + hl_rng_uniform (rng) * (f0 - f1) < 1.0)
        return x;
    }
}
