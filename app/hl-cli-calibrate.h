/* hl-cli-calibrate.h: the calibrate subcommand and the radiograph parts of
 * solve (hl-cli-calibrate.c).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "hl-cli.h"
#include "hl-plan.h"

extern const HlCliOption hl_cli_calibrate_options[];
int hl_cli_calibrate (const HlCliCommand *cmd, const HlCliArgs *args);

/* The "Radiographic measures" block of the solve text: native, every
 * option and the other side; nothing when no measure can be taken. */
void hl_cli_print_measures (const HlPlan *plan);
/* Leg length and global offset of native and every option against the
 * other hip, in words ("operated leg 4.0 mm shorter than the other");
 * nothing when the other side is not measured. */
void hl_cli_print_against_other (const HlPlan *plan);

/* One line on stderr when the plan's radiograph has moved, is missing or
 * has changed since the plan was saved; the plan is used all the same. */
void hl_cli_check_radiograph (const char *plan_path, const HlPlan *plan);
