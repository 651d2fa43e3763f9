/* hl-root.c: bracketing root finders (bisection, Brent) on GSL.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <glib.h>
#include <gsl/gsl_errno.h>

#include "hl-i18n.h"
#include "hl-root.h"

#define ROOT_FIELD "root finder"
#define CACHE_SIZE 4

/* GSL reports errors through a handler that aborts by default; the core
 * checks every status GSL returns, so the handler is turned off once. */
static void
gsl_errors_as_values (void)
{
  static gsize done = 0;
  if (g_once_init_enter (&done))
    {
      gsl_set_error_handler_off ();
      g_once_init_leave (&done, 1);
    }
}

static bool
same_sign (double a, double b)
{
  return (a < 0.0 && b < 0.0) || (a > 0.0 && b > 0.0);
}

static HlStatus
evaluate (HlRootSolver *s, double x, double *f, HlError *err)
{
  for (int i = 0; i < CACHE_SIZE; i++)
    if (s->cache_x[i] == x)
      {
        *f = s->cache_f[i];
        return HL_OK;
      }
  HlStatus st = s->function (x, s->data, f, err);
  if (st != HL_OK)
    return st;
  if (!isfinite (*f))
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The function is not a finite number at %.9g"), x);
  s->cache_x[s->cache_next] = x;
  s->cache_f[s->cache_next] = *f;
  s->cache_next = (s->cache_next + 1) % CACHE_SIZE;
  return HL_OK;
}

/* The gsl_function: a failure is kept in the solver and GSL sees NaN,
 * which stops its iteration with GSL_EBADFUNC. */
static double
gsl_function_cb (double x, void *data)
{
  HlRootSolver *s = data;
  double f;
  if (s->failed != HL_OK)
    return NAN;
  HlStatus st = evaluate (s, x, &f, s->err);
  if (st != HL_OK)
    {
      s->failed = st;
      return NAN;
    }
  return f;
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

static void
publish (HlRootSolver *s)
{
  s->root = gsl_root_fsolver_root (s->gsl);
  s->x_lower = gsl_root_fsolver_x_lower (s->gsl);
  s->x_upper = gsl_root_fsolver_x_upper (s->gsl);
}

HlStatus
hl_root_solver_set (HlRootSolver *s, HlRootMethod method,
                    HlRootFunction function, void *data,
                    double lower, double upper, HlError *err)
{
  memset (s, 0, sizeof *s);
  for (int i = 0; i < CACHE_SIZE; i++)
    s->cache_x[i] = NAN;
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

  gsl_errors_as_values ();
  s->gsl = gsl_root_fsolver_alloc (method == HL_ROOT_BRENT ? gsl_root_fsolver_brent
                                                           : gsl_root_fsolver_bisection);
  if (s->gsl == NULL)
    return hl_error_set (err, HL_ERR_NOMEM, ROOT_FIELD, _("Out of memory"));
  s->err = err;
  s->gsl_fn = (gsl_function) { gsl_function_cb, s };
  int gst = gsl_root_fsolver_set (s->gsl, &s->gsl_fn, lower, upper);
  s->err = NULL;
  if (s->failed != HL_OK)
    return s->failed;
  if (gst != GSL_SUCCESS)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The root finder cannot start: %s"), gsl_strerror (gst));
  publish (s);
  return HL_OK;
}

HlStatus
hl_root_solver_iterate (HlRootSolver *s, HlError *err)
{
  if (s->gsl == NULL)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The root finder was not set"));
  s->iterations++;
  s->err = err;
  int gst = gsl_root_fsolver_iterate (s->gsl);
  s->err = NULL;
  if (s->failed != HL_OK)
    return s->failed;
  if (gst != GSL_SUCCESS)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The root finder stopped: %s"), gsl_strerror (gst));
  publish (s);
  return HL_OK;
}

void
hl_root_solver_clear (HlRootSolver *s)
{
  if (s->gsl != NULL)
    gsl_root_fsolver_free (s->gsl);
  s->gsl = NULL;
}

bool
hl_root_test_interval (double lower, double upper, double epsabs,
                       double epsrel)
{
  gsl_errors_as_values ();
  return gsl_root_test_interval (lower, upper, epsabs, epsrel) == GSL_SUCCESS;
}

bool
hl_root_test_residual (double f, double epsabs)
{
  gsl_errors_as_values ();
  return gsl_root_test_residual (f, epsabs) == GSL_SUCCESS;
}

HlStatus
hl_root_find (HlRootSolver *s, HlRootMethod method,
              HlRootFunction function, void *data,
              double lower, double upper,
              double epsabs, double epsrel, int max_iter, HlError *err)
{
  memset (s, 0, sizeof *s);
  if (!(epsabs >= 0.0) || !(epsrel >= 0.0) || epsabs + epsrel <= 0.0)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The tolerances must be non-negative and not both zero "
                           "(absolute %g, relative %g)"), epsabs, epsrel);
  if (max_iter < 1)
    return hl_error_set (err, HL_ERR_INVALID, ROOT_FIELD,
                         _("The iteration limit must be at least 1 (it is %d)"),
                         max_iter);

  HlStatus st = hl_root_solver_set (s, method, function, data, lower, upper, err);
  while (st == HL_OK && !hl_root_test_interval (s->x_lower, s->x_upper, epsabs, epsrel))
    {
      if (s->iterations >= max_iter)
        st = hl_error_set (err, HL_ERR_NOT_CONVERGED, ROOT_FIELD,
                           _("No convergence to %g within %d iterations "
                             "(bracket %.9g to %.9g)"),
                           epsabs, max_iter, s->x_lower, s->x_upper);
      else
        st = hl_root_solver_iterate (s, err);
    }
  hl_root_solver_clear (s);
  /* the function at the final ends, for the caller that picks a side (the
   * last evaluations, kept, so usually no new solve) */
  if (st == HL_OK
      && ((st = evaluate (s, s->x_lower, &s->f_lower, err))
          || (st = evaluate (s, s->x_upper, &s->f_upper, err))))
    return st;
  return st;
}
