/* hl-root.h: one-dimensional root finding by bracketing, on GSL.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * A solver is set on a bracket [lower, upper] whose ends have function
 * values of opposite sign (or one of them zero), then iterated; each
 * iteration keeps a bracket of the root.  Convergence is tested separately
 * (hl_root_test_interval, hl_root_test_residual), so the caller decides
 * when to stop.  hl_root_find drives the three steps with the usual
 * tolerances.
 *
 * The work is GSL's (gsl_root_fsolver_bisection and gsl_root_fsolver_brent:
 * Brent 1973, Algorithms for Minimization without Derivatives, ch. 4;
 * gsl_root_test_interval); this file adds the project's errors: a function
 * that cannot be evaluated stops the solver with its own status and
 * message, "not reachable" is its own status.
 *
 * The solver is a caller-owned struct: solvers may run in parallel.  One
 * that was set must be cleared (hl_root_solver_clear); hl_root_find clears
 * it and leaves the final bracket in the struct.
 */
#pragma once

#include <stdbool.h>

#include <gsl/gsl_roots.h>

#include "hl-types.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Absolute tolerance in the unknown for the inverse questions (model.md
 * section 7: "to 1e-6"). */
#define HL_ROOT_EPSABS_DEFAULT 1e-6
/* No relative tolerance by default: the unknowns are millimetres, newtons
 * and kilograms of ordinary size, so the absolute test decides. */
#define HL_ROOT_EPSREL_DEFAULT 0.0
/* Bisection from a 2000-unit bracket to 1e-6 needs 31 iterations; 200
 * leaves room for Brent's worst case (at most about 4x bisection). */
#define HL_ROOT_MAX_ITER_DEFAULT 200

/* Evaluates f(x) into *f.  A failure (a solve that cannot be done at x)
 * stops the solver with that status; `err` says why. */
typedef HlStatus (*HlRootFunction) (double x, void *data, double *f,
                                    HlError *err);

typedef enum {
  HL_ROOT_BISECTION = 0,
  HL_ROOT_BRENT,
} HlRootMethod;

typedef struct {
  HlRootMethod method;
  HlRootFunction function;
  void *data;

  /* the current bracket and its function values */
  double x_lower;
  double x_upper;
  double f_lower;
  double f_upper;
  double root;       /* the current best estimate */
  int iterations;

  /* GSL's solver and the last evaluations (GSL evaluates the ends again
   * when it is set); private */
  gsl_root_fsolver *gsl;
  gsl_function gsl_fn;       /* GSL keeps a pointer to it */
  HlStatus failed;
  HlError *err;
  double cache_x[4], cache_f[4];
  int cache_next;
} HlRootSolver;

const char *hl_root_method_name (HlRootMethod method);

/* Sets the solver on [lower, upper].  Fails with HL_ERR_NOT_REACHABLE when
 * f has the same sign at both ends (no sign change: "not reachable in
 * range"), HL_ERR_INVALID on a bad bracket or method. */
HlStatus hl_root_solver_set (HlRootSolver *s, HlRootMethod method,
                             HlRootFunction function, void *data,
                             double lower, double upper, HlError *err);

/* One iteration: narrows the bracket. */
HlStatus hl_root_solver_iterate (HlRootSolver *s, HlError *err);

/* Frees GSL's solver; the bracket and root stay readable. */
void hl_root_solver_clear (HlRootSolver *s);

/* gsl_root_test_interval: true when the bracket [lower, upper] is narrower
 * than epsabs + epsrel * min(|lower|, |upper|) (across zero the relative
 * part is dropped); false on negative tolerances or lower > upper. */
bool hl_root_test_interval (double lower, double upper, double epsabs,
                            double epsrel);
/* True when |f| < epsabs. */
bool hl_root_test_residual (double f, double epsabs);

/* Sets, iterates and tests until the bracket is narrower than the
 * tolerances; the solver is cleared and left with its final bracket and the
 * function values at its ends (so the caller may pick the end on the side
 * it wants).  HL_ERR_NOT_CONVERGED after
 * max_iter iterations. */
HlStatus hl_root_find (HlRootSolver *s, HlRootMethod method,
                       HlRootFunction function, void *data,
                       double lower, double upper,
                       double epsabs, double epsrel, int max_iter,
                       HlError *err);

#ifdef __cplusplus
}
#endif
