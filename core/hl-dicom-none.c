/* hl-dicom-none.c: the DICOM reader of a build without GDCM.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "hl-gray-image.h"
#include "hl-i18n.h"

bool
hl_dicom_available (void)
{
  return false;
}

HlStatus
hl_dicom_read (const char *path, HlGrayImage **out, HlError *err)
{
  *out = NULL;
  return hl_error_set (err, HL_ERR_PARSE, path,
                       _("\"%s\" is a DICOM file, but DICOM is not available in this build "
                         "of hiplever (it was built without GDCM): export the image as a "
                         "16-bit PNG or TIFF"), path);
}
