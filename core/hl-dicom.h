/* hl-dicom.h: DICOM radiographs into 16-bit grey (C interface).
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Implemented in hl-dicom.cpp over GDCM when the build has it (meson
 * option `dicom`), else in hl-dicom-none.c, which says plainly that DICOM
 * files cannot be read by this build.  Called by hl_gray_image_load()
 * after the file's size and its "DICM" preamble have been checked.
 */
#pragma once

#include "hl-gray-image.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Reads the first frame of a DICOM file.  *out is a new image on success.
 * Reads only technical elements; identifying ones are never copied. */
HlStatus hl_dicom_read (const char *path, HlGrayImage **out, HlError *err);

#ifdef __cplusplus
}
#endif
