/* hl-root.c: bracketing root finders (bisection, Brent), after GSL.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <float.h>
#include <math.h>

#include "hl-i18n.h"
#include "hl-root.h"

#define ROOT_FIELD "root finder"

static bool
same_sign (double a, double b)
{
  return (a < 0.0 && b < 0.0) || (a > 0.0 && b > 0.0);
}

static HlStatus
evaluate (const HlRootSolver *s, double x, double *f, HlError *err)
{
  HlStatus st = s->function (x, s->data, f, err);
  if (st != HL_OK)
    return st;
  if (!isfinite (*f))
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The function is not a finite number at %.9g"), x);
  return HL_OK;
}

const char *
hl_root_method_name (HlRootMethod method)
{
  switch (method)
    {
    case HL_ROOT_BISECTION: return "bisection";
    case HL_ROOT_BRENT: return "brent";
    default: return "unknown";
    }
}

HlStatus
hl_root_solver_set (HlRootSolver *s, HlRootMethod method,
                    HlRootFunction function, void *data,
                    double lower, double upper, HlError *err)
{
  if (method != HL_ROOT_BISECTION && method != HL_ROOT_BRENT)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("Unknown root-finding method %d"), (int) method);
  if (function == NULL)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("No function to solve was given"));
  if (!isfinite (lower) || !isfinite (upper))
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The search range is not a pair of finite numbers"));
  if (!(lower < upper))
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The search range is empty: the lower end %.6g is not "
                           "below the upper end %.6g"), lower, upper);

  s->method = method;
  s->function = function;
  s->data = data;
  s->iterations = 0;
  s->x_lower = lower;
  s->x_upper = upper;

  HlStatus st;
  if ((st = evaluate (s, lower, &s->f_lower, err))
      || (st = evaluate (s, upper, &s->f_upper, err)))
    return st;

  if (same_sign (s->f_lower, s->f_upper))
    return hl_error_set (err, HL_ERR_NOT_REACHABLE, ROOT_FIELD,
                         _("Not reachable in range: no sign change between "
                           "%.6g and %.6g"), lower, upper);

  if (s->f_lower == 0.0)
    {
      s->x_upper = lower;
      s->f_upper = 0.0;
    }
  else if (s->f_upper == 0.0)
    {
      s->x_lower = upper;
      s->f_lower = 0.0;
    }
  s->root = 0.5 * (s->x_lower + s->x_upper);

  s->a = lower;
  s->fa = s->f_lower;
  s->b = upper;
  s->fb = s->f_upper;
  s->c = upper;
  s->fc = s->f_upper;
  s->d = upper - lower;
  s->e = upper - lower;
  if (s->f_lower == 0.0)
    {
      s->b = lower;
      s->fb = 0.0;
    }
  return HL_OK;
}

static HlStatus
bisection_iterate (HlRootSolver *s, HlError *err)
{
  if (s->f_lower == 0.0 || s->f_upper == 0.0 || s->x_lower == s->x_upper)
    {
      s->root = s->f_lower == 0.0 ? s->x_lower : s->x_upper;
      s->x_lower = s->x_upper = s->root;
      s->f_lower = s->f_upper = 0.0;
      return HL_OK;
    }

  double x_mid = 0.5 * (s->x_lower + s->x_upper);
  double f_mid;
  HlStatus st = evaluate (s, x_mid, &f_mid, err);
  if (st != HL_OK)
    return st;

  if (f_mid == 0.0)
    {
      s->root = s->x_lower = s->x_upper = x_mid;
      s->f_lower = s->f_upper = 0.0;
    }
  else if (same_sign (f_mid, s->f_lower))
    {
      s->x_lower = x_mid;
      s->f_lower = f_mid;
    }
  else
    {
      s->x_upper = x_mid;
      s->f_upper = f_mid;
    }
  s->root = 0.5 * (s->x_lower + s->x_upper);
  return HL_OK;
}

static void
brent_publish (HlRootSolver *s)
{
  /* The bracket is b and whichever of a, c has the other sign. */
  double x_other = s->c, f_other = s->fc;
  if (same_sign (s->fb, s->fc))
    {
      x_other = s->a;
      f_other = s->fa;
    }
  s->root = s->b;
  if (s->fb == 0.0)
    {
      x_other = s->b;
      f_other = 0.0;
    }
  if (s->b <= x_other)
    {
      s->x_lower = s->b;
      s->f_lower = s->fb;
      s->x_upper = x_other;
      s->f_upper = f_other;
    }
  else
    {
      s->x_lower = x_other;
      s->f_lower = f_other;
      s->x_upper = s->b;
      s->f_upper = s->fb;
    }
}

static HlStatus
brent_iterate (HlRootSolver *s, HlError *err)
{
  double a = s->a, b = s->b, c = s->c, d = s->d, e = s->e;
  double fa = s->fa, fb = s->fb, fc = s->fc;
  bool ac_equal = false;

  if (same_sign (fb, fc))
    {
      ac_equal = true;
      c = a;
      fc = fa;
      d = e = b - a;
    }
  if (fabs (fc) < fabs (fb))
    {
      ac_equal = true;
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }

  /* Steps below half an ulp of b cannot move it. */
  double tol = 0.5 * DBL_EPSILON * fabs (b);
  double m = 0.5 * (c - b);

  if (fb == 0.0 || fabs (m) <= tol)
    {
      s->a = a; s->b = b; s->c = c; s->d = d; s->e = e;
      s->fa = fa; s->fb = fb; s->fc = fc;
      brent_publish (s);
      if (fb != 0.0)
        {
          s->x_lower = fmin (b, c);
          s->x_upper = fmax (b, c);
        }
      return HL_OK;
    }

  if (fabs (e) < tol || fabs (fa) <= fabs (fb))
    {
      d = m;
      e = m;
    }
  else
    {
      double p, q, r;
      double ratio = fb / fa;
      if (ac_equal)
        {
          p = 2.0 * m * ratio;
          q = 1.0 - ratio;
        }
      else
        {
          q = fa / fc;
          r = fb / fc;
          p = ratio * (2.0 * m * q * (q - r) - (b - a) * (r - 1.0));
          q = (q - 1.0) * (r - 1.0) * (ratio - 1.0);
        }
      if (p > 0.0)
        q = -q;
      else
        p = -p;
      if (2.0 * p < fmin (3.0 * m * q - fabs (tol * q), fabs (e * q)))
        {
          e = d;
          d = p / q;
        }
      else
        {
          d = m;
          e = m;
        }
    }

  a = b;
  fa = fb;
  if (fabs (d) > tol)
    b += d;
  else
    b += m > 0.0 ? tol : -tol;

  HlStatus st = evaluate (s, b, &fb, err);
  if (st != HL_OK)
    return st;

  s->a = a; s->b = b; s->c = c; s->d = d; s->e = e;
  s->fa = fa; s->fb = fb; s->fc = fc;
  brent_publish (s);
  return HL_OK;
}

HlStatus
hl_root_solver_iterate (HlRootSolver *s, HlError *err)
{
  s->iterations++;
  if (s->method == HL_ROOT_BRENT)
    return brent_iterate (s, err);
  return bisection_iterate (s, err);
}

bool
hl_root_test_interval (double lower, double upper, double epsabs,
                       double epsrel)
{
  if (!(epsabs >= 0.0) || !(epsrel >= 0.0) || lower > upper)
    return false;
  if (lower == upper)
    return true;

  double min_abs = 0.0;
  if ((lower > 0.0 && upper > 0.0) || (lower < 0.0 && upper < 0.0))
    min_abs = fmin (fabs (lower), fabs (upper));
  return upper - lower < epsabs + epsrel * min_abs;
}

bool
hl_root_test_residual (double f, double epsabs)
{
  return epsabs >= 0.0 && fabs (f) < epsabs;
}

HlStatus
hl_root_find (HlRootSolver *s, HlRootMethod method,
              HlRootFunction function, void *data,
              double lower, double upper,
              double epsabs, double epsrel, int max_iter, HlError *err)
{
  if (!(epsabs >= 0.0) || !(epsrel >= 0.0) || epsabs + epsrel <= 0.0)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The tolerances must be non-negative and not both zero "
                           "(absolute %g, relative %g)"), epsabs, epsrel);
  if (max_iter < 1)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The iteration limit must be at least 1 (it is %d)"),
                         max_iter);

  HlStatus st = hl_root_solver_set (s, method, function, data, lower, upper, err);
  if (st != HL_OK)
    return st;

  while (!hl_root_test_interval (s->x_lower, s->x_upper, epsabs, epsrel))
    {
      if (s->iterations >= max_iter)
        return hl_error_set (err, HL_ERR_NOT_CONVERGED, ROOT_FIELD,
                             _("No convergence to %g within %d iterations "
                               "(bracket %.9g to %.9g)"),
                             epsabs, max_iter, s->x_lower, s->x_upper);
      if ((st = hl_root_solver_iterate (s, err)))
        return st;
    }
  return HL_OK;
}
