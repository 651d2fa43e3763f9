/* hl-batch.c: many what-ifs of one prepared model at once.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Built with -O3 (core/meson.build) so that GCC vectorises the kernel: no
 * branches (every test is a select), no calls but sqrt (one instruction
 * with -fno-math-errno), restrict arrays.  The what-ifs go in blocks:
 * a scalar pass works out the femoral shift (a table look-up or sin and
 * cos per what-if) and the forces into small arrays on the stack, then the
 * vector kernel solves the block.
 */
#include "config.h"

#include <float.h>
#include <math.h>
#include <stdbool.h>

#include "hl-batch.h"
#include "hl-solve-private.h"

#define RAD_TO_DEG (180.0 / M_PI)
/* What-ifs per block: the scratch arrays stay in the first-level cache. */
#define HL_BATCH_BLOCK 256
/* tan (pi / 8): the reduction point of the arctangent below. */
#define TAN_PI_8 0.41421356237309504880
/* The low parts of pi / 2 and pi / 4 (pi / 2 - (double) M_PI_2). */
#define PI_2_LO 6.123233995736765886130e-17
#define PI_4_LO 3.061616997868382943065e-17
/* Adding and taking away 1.5 * 2^52 rounds a double below 2^51 to the
 * nearest whole number. */
#define ROUND_MAGIC 0x1.8p52

/* atan (z) for |z| <= tan (pi / 8): z + z^3 P (z^2) / Q (z^2), the
 * rational approximation of S. L. Moshier, Cephes Math Library (1984-2000)
 * atan.c, also printed in Moshier 1989, Methods and Programs for
 * Mathematical Functions (Ellis Horwood).  Coefficients written from
 * memory; tests/test-solve.c checks the result against the C library's
 * atan2 to 1e-12 relative over the whole quadrant. */
static inline double
atan_small (double z)
{
  const double z2 = z * z;
  const double p = (((-8.750608600031904122785e-1 * z2
                      - 1.615753718733365076637e1) * z2
                     - 7.500855792314704667340e1) * z2
                    - 1.228866684490136173410e2) * z2
                   - 6.485021904942025371773e1;
  const double q = ((((z2 + 2.485846490142306297962e1) * z2
                      + 1.650270098316988542046e2) * z2
                     + 4.328810604912902668951e2) * z2
                    + 4.853903996359136964868e2) * z2
                   + 1.945506571482613964425e2;
  return z + z * z2 * p / q;
}

/* atan2 (y, x) for y, x >= 0, branch-free: the angle in [0, pi / 2].
 * With t = lo / hi in [0, 1], atan (t) = pi / 4 + atan ((t - 1) / (t + 1))
 * above tan (pi / 8), worked as (lo - hi) / (lo + hi) so that there is one
 * division, done whatever the select then takes (a division under a
 * condition would keep the compiler from vectorising). */
static inline double
atan2_quadrant (double y, double x)
{
  const int swap = y > x;
  const double hi = swap ? y : x, lo = swap ? x : y;
  const int big = lo > TAN_PI_8 * hi;
  const double num = big ? lo - hi : lo;
  const double den = big ? lo + hi : hi > 0.0 ? hi : 1.0;
  const double z = num / den;                       /* |z| <= tan (pi / 8) */
  const double a = big ? M_PI_4 + (atan_small (z) + PI_4_LO) : atan_small (z);
  return swap ? M_PI_2 - a + PI_2_LO : a;
}

/* Where the compiler can make versions for newer x86-64 processors, the
 * program picks the widest the processor runs when it starts (4 doubles
 * per instruction with AVX2, 8 with AVX-512); else the baseline build. */
#if defined(HL_HAVE_TARGET_CLONES)
#define HL_BATCH_CLONES \
  __attribute__ ((target_clones ("arch=x86-64-v4", "arch=x86-64-v3", "default")))
#else
#define HL_BATCH_CLONES
#endif
/* The block functions are built into each version. */
#define HL_BATCH_INLINE static inline __attribute__ ((always_inline))

/* One block; every array holds n values.  The order of the arithmetic is
 * that of hl_model_solve(), so the results agree to the last bit but for
 * the angle.  `angle_mode` is a constant in each caller below, so each
 * gets its own loop without the other's arithmetic. */
static inline size_t
solve_block (const bool angle_mode, const HlModel *restrict m, size_t n,
             const double *restrict cm_in, const double *restrict cs_in,
             const double *restrict fo_in, const double *restrict fl_in,
             const double *restrict cane_in, const double *restrict l0_in,
             const double *restrict l1_in, const double *restrict lm_in,
             double *restrict arm_out, double *restrict lever_out,
             double *restrict fa_out, double *restrict jx_out,
             double *restrict jy_out, double *restrict j_out,
             double *restrict angle_out)
{
  const double ox0 = m->origin.x, oy0 = m->origin.y;
  const double ix0 = m->insertion.x, iy0 = m->insertion.y;
  const double mx0 = m->midline.x, my0 = m->midline.y, slope = m->midline_slope;
  const double ufx = m->u_fixed.x, ufy = m->u_fixed.y;
  const double w_s = m->w_s_n, factor = m->bw_line_factor, lean = m->lean_mm;
  const double cane_dx = m->cane_dx, dx0 = m->load_dx[0], dx1 = m->load_dx[1];
  double refused = 0.0;

  for (size_t i = 0; i < n; i++)
    {
      const double cm = cm_in[i], cs = cs_in[i], fo = fo_in[i], fl = fl_in[i];
      const double cane = cane_in[i], l0 = l0_in[i], l1 = l1_in[i], lm = lm_in[i];
      const double ox = ox0 + cm, oy = oy0 - cs;
      const double ix = ix0 + fo, iy = iy0 - fl;
      const double xm = (mx0 + cm) - (my0 - cs) * slope;

      const double dx = ix - ox, dy = iy - oy;
      const double len = sqrt (dx * dx + dy * dy);
      const double ux = angle_mode ? ufx : dx;
      const double uy = angle_mode ? ufy : dy;
      const double cross = angle_mode ? ix * ufy - iy * ufx : ox * dy - oy * dx;
      const double ra = angle_mode ? cross : cross / len;
      const double arm_scale = angle_mode ? 1.0 : len;

      const double sum = cm + cs + fo + fl;
      const int bad = !(fabs (sum) <= DBL_MAX) | !(xm < 0.0)
                      | (!angle_mode & (len < HL_MIN_ABDUCTOR_LENGTH_MM))
                      | (ra > -HL_MIN_ABDUCTOR_ARM_MM);

      const double xs = xm * factor + lean;
      const double fy_ext = -w_s + cane - l0 - l1 - lm;
      const double moment = -w_s * xs
                            + cane * (xm + cane_dx)
                            - l0 * (xm + dx0)
                            - l1 * (xm + dx1)
                            - lm * xm;
      const double inv_cross = 1.0 / cross;
      const double k0 = -moment * inv_cross;
      const double k = k0 < 0.0 ? 0.0 : k0;
      const double fa = k * arm_scale;
      const double jx = -k * ux;
      const double jy = -(k * uy + fy_ext);
      const double lever = -fabs (xs) * arm_scale * inv_cross;
      const double j = sqrt (jx * jx + jy * jy);
      const double angle = atan2_quadrant (fabs (jx), fabs (jy)) * RAD_TO_DEG;

      arm_out[i] = bad ? NAN : -ra;
      lever_out[i] = bad ? NAN : lever;
      fa_out[i] = bad ? NAN : fa;
      jx_out[i] = bad ? NAN : jx;
      jy_out[i] = bad ? NAN : jy;
      j_out[i] = bad ? NAN : j;
      angle_out[i] = bad ? NAN : angle;
      refused += bad ? 1.0 : 0.0;
    }
  return (size_t) refused;
}

#define SOLVE_BLOCK_ARGS \
  const HlModel *restrict m, size_t n, \
  const double *restrict cm_in, const double *restrict cs_in, \
  const double *restrict fo_in, const double *restrict fl_in, \
  const double *restrict cane_in, const double *restrict l0_in, \
  const double *restrict l1_in, const double *restrict lm_in, \
  double *restrict arm_out, double *restrict lever_out, \
  double *restrict fa_out, double *restrict jx_out, \
  double *restrict jy_out, double *restrict j_out, \
  double *restrict angle_out
#define SOLVE_BLOCK_PASS \
  m, n, cm_in, cs_in, fo_in, fl_in, cane_in, l0_in, l1_in, lm_in, \
  arm_out, lever_out, fa_out, jx_out, jy_out, j_out, angle_out

/* The abductor line set by an angle through the insertion. */
HL_BATCH_INLINE size_t
solve_block_angle (SOLVE_BLOCK_ARGS)
{
  return solve_block (true, SOLVE_BLOCK_PASS);
}

/* The abductor line through the origin and insertion points. */
HL_BATCH_INLINE size_t
solve_block_points (SOLVE_BLOCK_ARGS)
{
  return solve_block (false, SOLVE_BLOCK_PASS);
}

/* hl_femur_shift() for a block: the whole-degree neck-shaft angles of the
 * table in a loop the compiler can vectorise (the angle clamped into the
 * table and rounded with the 1.5 * 2^52 trick, so that no conversion is
 * out of range), then any other angle with a non-zero head length through
 * hl_femur_shift() itself. */
HL_BATCH_INLINE void
femur_shift_block (size_t n, const double *restrict off_in,
                   const double *restrict len_in, const double *restrict head_in,
                   const double *restrict neck_in, double *restrict fo,
                   double *restrict fl, double *restrict other)
{
  const double *table = &hl_neck_sin_cos[0][0];

  for (size_t i = 0; i < n; i++)
    {
      const double deg = neck_in[i], head = head_in[i];
      const double above = deg >= HL_NECK_TABLE_FIRST ? deg : HL_NECK_TABLE_FIRST;
      const double d = above <= HL_NECK_TABLE_LAST ? above : HL_NECK_TABLE_LAST;
      const double whole = (d + ROUND_MAGIC) - ROUND_MAGIC;
      const int row = 2 * ((int) whole - HL_NECK_TABLE_FIRST);
      /* a zero head length adds nothing, as in hl_femur_shift() */
      fo[i] = off_in[i] + head * table[row];
      fl[i] = len_in[i] - head * table[row + 1];
      other[i] = whole != deg ? head : 0.0;
    }
  for (size_t i = 0; i < n; i++)
    if (other[i] != 0.0)
      hl_femur_shift (off_in[i], len_in[i], head_in[i], neck_in[i], &fo[i], &fl[i]);
}

HL_BATCH_INLINE void
fill_forces (double *restrict dst, const double *restrict src, double value,
             size_t n)
{
  if (src != NULL)
    for (size_t i = 0; i < n; i++)
      dst[i] = src[i];
  else
    for (size_t i = 0; i < n; i++)
      dst[i] = value;
}

HL_BATCH_CLONES size_t
hl_model_solve_batch (const HlModel *model, const HlBatchInput *in,
                      const HlBatchOutput *out, size_t n)
{
  double fo[HL_BATCH_BLOCK], fl[HL_BATCH_BLOCK];
  double cane[HL_BATCH_BLOCK], l0[HL_BATCH_BLOCK], l1[HL_BATCH_BLOCK];
  double lm[HL_BATCH_BLOCK], other[HL_BATCH_BLOCK];
  size_t refused = 0;

  for (size_t start = 0; start < n; start += HL_BATCH_BLOCK)
    {
      const size_t b = n - start < HL_BATCH_BLOCK ? n - start : HL_BATCH_BLOCK;

      femur_shift_block (b, in->femoral_offset_mm + start,
                         in->femoral_length_mm + start, in->head_length_mm + start,
                         in->neck_shaft_angle_deg + start, fo, fl, other);
      fill_forces (cane, in->cane_n ? in->cane_n + start : NULL, model->cane_n, b);
      fill_forces (l0, in->load_n[0] ? in->load_n[0] + start : NULL,
                   model->load_n[0], b);
      fill_forces (l1, in->load_n[1] ? in->load_n[1] + start : NULL,
                   model->load_n[1], b);
      fill_forces (lm, in->load_midline_n ? in->load_midline_n + start : NULL,
                   model->load_midline_n, b);

      refused += model->angle_mode
        ? solve_block_angle (model, b, in->cup_medial_mm + start,
                             in->cup_superior_mm + start, fo, fl, cane, l0, l1, lm,
                             out->abductor_arm_mm + start, out->lever_ratio + start,
                             out->abductor_force_n + start, out->jrf_x_n + start,
                             out->jrf_y_n + start, out->jrf_n + start,
                             out->jrf_angle_deg + start)
        : solve_block_points (model, b, in->cup_medial_mm + start,
                              in->cup_superior_mm + start, fo, fl, cane, l0, l1, lm,
                              out->abductor_arm_mm + start, out->lever_ratio + start,
                              out->abductor_force_n + start, out->jrf_x_n + start,
                              out->jrf_y_n + start, out->jrf_n + start,
                              out->jrf_angle_deg + start);
    }
  return refused;
}
