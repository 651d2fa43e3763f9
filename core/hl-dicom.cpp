/* hl-dicom.cpp: DICOM radiographs into 16-bit grey, over GDCM.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Only these elements are read from the data set, all technical:
 *   (0028,0002) Samples per Pixel      (0028,0004) Photometric Interpretation
 *   (0028,0008) Number of Frames       (0028,0010/0011) Rows, Columns
 *   (0028,0100/0101/0102/0103) Bits Allocated, Stored, High Bit, Representation
 *   (0028,1050/1051) Window Centre, Width
 *   (0028,1052/1053) Rescale Intercept, Slope
 *   (0028,0030) Pixel Spacing          (0028,0A02) Pixel Spacing Calibration Type
 *   (0018,1164) Imager Pixel Spacing   (0018,1114) Estimated Radiographic
 *                                                  Magnification Factor
 *   (0028,0301) Burned In Annotation   (7FE0,0010) Pixel Data
 * GDCM parses the whole file into memory; nothing else of it is copied,
 * printed or logged (GDCM's own messages are switched off), so patient,
 * study and institution elements never leave this function.
 *
 * Checks made before GDCM decodes anything (a header pass that stops at
 * the pixel data): rows and columns not zero and within the limits, bits
 * allocated 8 or 16, 1 or 3 samples, a transfer syntax GDCM knows, and
 * the decoded size of all frames within DECODED_MAX_BYTES.
 */
#include "config.h"

#include <algorithm>
#include <clocale>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <locale>
#include <new>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include <cerrno>
#include <csignal>
#include <cstdlib>

#include <fcntl.h>
#include <poll.h>
#include <time.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <gdcmFileMetaInformation.h>
#include <gdcmImage.h>
#include <gdcmImageApplyLookupTable.h>
#include <gdcmImageReader.h>
#include <gdcmReader.h>
#include <gdcmTrace.h>
#include <gdcmTransferSyntax.h>

#include "hl-gray-image.h"
#include "hl-i18n.h"

/* All frames of a file are decoded by GDCM before the first is kept:
 * refuse more than this (1 GiB) before decoding. */
static const unsigned long long DECODED_MAX_BYTES = 1ULL << 30;
static const int VALUES_MAX = 4;

/* The reading child's memory budget, in two stages (see
 * child_limit_memory): raised after the header pass to what the header
 * says the decoding needs. */
static void child_allow_decoding (unsigned long long decoded_bytes);

namespace {

/* Up to `max` decimal-string values of an element (DS/IS); returns the
 * count, 0 when absent or empty, -1 when a value is not a finite number. */
int
read_numbers (const gdcm::DataSet &ds, uint16_t group, uint16_t elem,
              double *vals, int max)
{
  const gdcm::Tag tag (group, elem);
  if (!ds.FindDataElement (tag))
    return 0;
  const gdcm::DataElement &de = ds.GetDataElement (tag);
  const gdcm::ByteValue *bv = de.GetByteValue ();
  if (bv == nullptr || bv->GetLength () == 0)
    return 0;
  std::string s (bv->GetPointer (), bv->GetLength ());
  int n = 0;
  size_t start = 0;
  while (start <= s.size () && n < max)
    {
      size_t end = s.find ('\\', start);
      if (end == std::string::npos)
        end = s.size ();
      std::string tok = s.substr (start, end - start);
      size_t a = tok.find_first_not_of (" \t\r\n");
      size_t b = tok.find_last_not_of (" \t\r\n" + std::string (1, '\0'));
      if (a == std::string::npos || b == std::string::npos || b < a)
        return n == 0 && end == s.size () ? 0 : -1;
      tok = tok.substr (a, b - a + 1);
      std::istringstream in (tok);
      in.imbue (std::locale::classic ());
      double v;
      in >> v;
      if (in.fail () || !in.eof () || !std::isfinite (v))
        {
          /* "in >> v" leaves eof unset when the token ended exactly at a
           * number; check that nothing follows. */
          if (in.fail () || !std::isfinite (v))
            return -1;
          std::string rest;
          in >> rest;
          if (!rest.empty ())
            return -1;
        }
      vals[n++] = v;
      start = end + 1;
      if (end == s.size ())
        break;
    }
  return n;
}

/* A code string (CS) trimmed; "" when absent. */
std::string
read_code (const gdcm::DataSet &ds, uint16_t group, uint16_t elem)
{
  const gdcm::Tag tag (group, elem);
  if (!ds.FindDataElement (tag))
    return "";
  const gdcm::ByteValue *bv = ds.GetDataElement (tag).GetByteValue ();
  if (bv == nullptr)
    return "";
  std::string s (bv->GetPointer (), bv->GetLength ());
  size_t a = s.find_first_not_of (std::string (" \0", 2));
  size_t b = s.find_last_not_of (std::string (" \0", 2));
  if (a == std::string::npos)
    return "";
  return s.substr (a, b - a + 1);
}

/* An unsigned short (US), in the byte order of the data set. */
bool
read_us (const gdcm::DataSet &ds, uint16_t group, uint16_t elem, bool big_endian,
         unsigned *out)
{
  const gdcm::Tag tag (group, elem);
  if (!ds.FindDataElement (tag))
    return false;
  const gdcm::ByteValue *bv = ds.GetDataElement (tag).GetByteValue ();
  if (bv == nullptr || bv->GetLength () < 2)
    return false;
  const unsigned char *p = reinterpret_cast<const unsigned char *> (bv->GetPointer ());
  *out = big_endian ? (p[0] << 8) | p[1] : p[0] | (p[1] << 8);
  return true;
}

HlStatus
fail (HlError *err, HlStatus st, const char *path, const char *what)
{
  return hl_error_set (err, st, path, _("The DICOM file \"%s\" cannot be opened: %s"),
                       path, what);
}

struct Header {
  unsigned rows = 0, cols = 0, bits_allocated = 0, samples = 1;
  unsigned bits_stored = 0, high_bit = 0;
  long long frames = 1;
};

/* The transfer syntax UID the file meta information names, or "". */
std::string
meta_transfer_syntax (const gdcm::File &file)
{
  const gdcm::FileMetaInformation &meta = file.GetHeader ();
  const gdcm::Tag tag (0x0002, 0x0010);
  if (!meta.FindDataElement (tag))
    return "";
  const gdcm::ByteValue *bv = meta.GetDataElement (tag).GetByteValue ();
  if (bv == nullptr)
    return "";
  std::string s (bv->GetPointer (), bv->GetLength ());
  while (!s.empty () && (s.back () == '\0' || s.back () == ' '))
    s.pop_back ();
  /* A UID is digits and dots: anything else is not printed. */
  if (s.size () > 64 || s.find_first_not_of ("0123456789.") != std::string::npos)
    return "?";
  return s;
}

HlStatus
bad_transfer_syntax (const char *path, const std::string &uid, HlError *err)
{
  return hl_error_set (err, HL_ERR_PARSE, path,
                       _("The DICOM file \"%s\" cannot be opened: its transfer syntax "
                         "(UID %s) is not one this program can decode"),
                       path, uid.c_str ());
}

/* The header pass: the elements up to the pixel data only. */
HlStatus
check_header (const char *path, Header *h, HlError *err)
{
  gdcm::Reader reader;
  reader.SetFileName (path);
  std::set<gdcm::Tag> skip;
  skip.insert (gdcm::Tag (0x7fe0, 0x0010));   /* the pixels are not read here */
  bool read = reader.ReadUpToTag (gdcm::Tag (0x7fe0, 0x0010), skip);
  const gdcm::File &file = reader.GetFile ();
  const gdcm::TransferSyntax ts = file.GetHeader ().GetDataSetTransferSyntax ();
  std::string uid = meta_transfer_syntax (file);
  if (!uid.empty () && (ts == gdcm::TransferSyntax::TS_END
                        || gdcm::TransferSyntax::GetTSType (uid.c_str ())
                           == gdcm::TransferSyntax::TS_END))
    return bad_transfer_syntax (path, uid, err);
  if (!read)
    return fail (err, HL_ERR_PARSE, path,
                 _("it is not a readable DICOM file (truncated or damaged)"));
  if (ts == gdcm::TransferSyntax::TS_END)
    return bad_transfer_syntax (path, uid.empty () ? "?" : uid, err);
  const gdcm::DataSet &ds = file.GetDataSet ();
  const bool be = ts.GetSwapCode () == gdcm::SwapCode::BigEndian;
  if (!read_us (ds, 0x0028, 0x0010, be, &h->rows) || !read_us (ds, 0x0028, 0x0011, be, &h->cols))
    return fail (err, HL_ERR_PARSE, path, _("it holds no image (no rows or columns)"));
  if (!read_us (ds, 0x0028, 0x0100, be, &h->bits_allocated))
    return fail (err, HL_ERR_PARSE, path, _("it does not say how many bits a pixel has"));
  if (h->bits_allocated != 8 && h->bits_allocated != 16)
    {
      char msg[160];
      snprintf (msg, sizeof msg, _("%u bits allocated a pixel: only 8 and 16 are read"),
                h->bits_allocated);
      return fail (err, HL_ERR_PARSE, path, msg);
    }
  if (!read_us (ds, 0x0028, 0x0002, be, &h->samples))
    h->samples = 1;
  /* Values GDCM asserts on, or may (the program would abort), refused
   * here: a fuzz finding for the planar configuration. */
  if (!read_us (ds, 0x0028, 0x0101, be, &h->bits_stored))
    h->bits_stored = h->bits_allocated;
  if (h->bits_stored == 0 || h->bits_stored > h->bits_allocated)
    return fail (err, HL_ERR_PARSE, path,
                 _("its Bits Stored (0028,0101) does not fit its Bits Allocated"));
  if (!read_us (ds, 0x0028, 0x0102, be, &h->high_bit))
    h->high_bit = h->bits_stored - 1;
  if (h->high_bit >= h->bits_allocated || h->high_bit + 1 < h->bits_stored)
    return fail (err, HL_ERR_PARSE, path,
                 _("its High Bit (0028,0102) does not fit its bits stored and allocated"));
  unsigned v;
  if (read_us (ds, 0x0028, 0x0006, be, &v) && v > 1)
    return fail (err, HL_ERR_PARSE, path,
                 _("its Planar Configuration (0028,0006) is neither 0 nor 1"));
  if (read_us (ds, 0x0028, 0x0103, be, &v) && v > 1)
    return fail (err, HL_ERR_PARSE, path,
                 _("its Pixel Representation (0028,0103) is neither 0 nor 1"));
  if (h->samples != 1 && h->samples != 3)
    return fail (err, HL_ERR_PARSE, path,
                 _("its pixels have neither 1 nor 3 samples"));
  double fr[1];
  int n = read_numbers (ds, 0x0028, 0x0008, fr, 1);
  if (n < 0 || (n == 1 && (fr[0] < 1 || fr[0] > 1e6 || fr[0] != std::floor (fr[0]))))
    return fail (err, HL_ERR_PARSE, path, _("its Number of Frames (0028,0008) is not valid"));
  h->frames = n == 1 ? (long long) fr[0] : 1;
  HlStatus st = hl_gray_image_check_size (path, h->cols, h->rows, err);
  if (st != HL_OK)
    return st;
  unsigned long long bytes = (unsigned long long) h->rows * h->cols * h->samples
                             * (h->bits_allocated / 8) * (unsigned long long) h->frames;
  if (bytes > DECODED_MAX_BYTES)
    return fail (err, HL_ERR_PARSE, path,
                 _("its frames would take more than 1 GiB decoded"));
  /* Uncompressed pixels: the file must hold them all.  The reader stopped
   * at the value of the Pixel Data element (at most 12 bytes of tag, VR
   * and length before it). */
  if (!ts.IsEncapsulated ())
    {
      struct stat sb;
      if (stat (path, &sb) != 0)
        return fail (err, HL_ERR_IO, path, _("it cannot be read"));
      unsigned long long pos = reader.GetStreamCurrentPosition ();
      if (pos == 0 || pos > (unsigned long long) sb.st_size
          || (unsigned long long) sb.st_size - pos + 12 < bytes)
        return fail (err, HL_ERR_PARSE, path,
                     _("it is truncated: its pixel data is shorter than its image size"));
    }
  return HL_OK;
}

/* Reads the calibration elements: a value present but 0, negative or not
 * a number is an error naming the element. */
HlStatus
read_spacing (const char *path, const gdcm::DataSet &ds, HlFileSpacing *sp,
              HlError *err)
{
  struct { uint16_t g, e; const char *name; bool *has; double *val; int want; } rows[] = {
    { 0x0028, 0x0030, "Pixel Spacing (0028,0030)", &sp->has_pixel_spacing,
      &sp->pixel_spacing_mm, 2 },
    { 0x0018, 0x1164, "Imager Pixel Spacing (0018,1164)", &sp->has_imager_spacing,
      &sp->imager_spacing_mm, 2 },
    { 0x0018, 0x1114, "Estimated Radiographic Magnification Factor (0018,1114)",
      &sp->has_magnification, &sp->magnification, 1 },
  };
  for (auto &r : rows)
    {
      double v[VALUES_MAX];
      int n = read_numbers (ds, r.g, r.e, v, VALUES_MAX);
      if (n == 0)
        continue;
      bool ok = n >= r.want;
      for (int i = 0; ok && i < r.want; i++)
        ok = std::isfinite (v[i]) && v[i] > 0;
      if (!ok)
        return hl_error_set (err, HL_ERR_INVALID, path,
                             _("The DICOM file \"%s\": %s is not a positive number"),
                             path, r.name);
      if (r.want == 2 && std::fabs (v[0] - v[1]) > 1e-9 * std::max (v[0], v[1]))
        return hl_error_set (err, HL_ERR_INVALID, path,
                             _("The DICOM file \"%s\": %s gives rows %g mm and columns %g mm apart: "
                               "only square pixels are supported"),
                             path, r.name, v[0], v[1]);
      *r.has = true;
      *r.val = v[0];
    }
  const gdcm::Tag cal_type (0x0028, 0x0a02);
  sp->pixel_spacing_calibrated = ds.FindDataElement (cal_type)
                                 && !read_code (ds, 0x0028, 0x0a02).empty ();
  return HL_OK;
}

/* Raw stored value of sample `i` of the buffer, sign-extended or masked
 * to the bits stored. */
inline long
raw_value (const unsigned char *buf, size_t i, unsigned bytes, unsigned bits_stored,
           unsigned shift, bool is_signed)
{
  unsigned v = bytes == 1 ? buf[i] : (unsigned) ((const uint16_t *) buf)[i];
  v >>= shift;
  unsigned mask = bits_stored >= 16 ? 0xffffu : ((1u << bits_stored) - 1u);
  v &= mask;
  if (is_signed && bits_stored < 32 && (v & (1u << (bits_stored - 1))))
    return (long) v - (1L << bits_stored);
  return (long) v;
}

HlStatus
read_image (const char *path, HlGrayImage **out, HlError *err)
{
  Header h;
  HlStatus st = check_header (path, &h, err);
  if (st != HL_OK)
    return st;
  child_allow_decoding ((unsigned long long) h.rows * h.cols * h.samples
                        * (h.bits_allocated / 8) * (unsigned long long) h.frames);

  gdcm::ImageReader reader;
  reader.SetFileName (path);
  if (!reader.Read ())
    return fail (err, HL_ERR_PARSE, path,
                 _("its image could not be read (truncated, damaged, or a kind of "
                   "DICOM file without an image)"));
  const gdcm::Image &image = reader.GetImage ();
  const gdcm::DataSet &ds = reader.GetFile ().GetDataSet ();
  const unsigned int *dims = image.GetDimensions ();
  if (dims[0] != h.cols || dims[1] != h.rows)
    return fail (err, HL_ERR_PARSE, path, _("its image size is inconsistent"));

  gdcm::PhotometricInterpretation pi = image.GetPhotometricInterpretation ();
  std::vector<char> buffer;
  const gdcm::Image *src = &image;
  gdcm::ImageApplyLookupTable lut;
  if (pi == gdcm::PhotometricInterpretation::PALETTE_COLOR)
    {
      lut.SetInput (image);
      if (!lut.Apply ())
        return fail (err, HL_ERR_PARSE, path, _("its colour palette could not be applied"));
      src = &lut.GetOutput ();
    }
  const gdcm::PixelFormat &spf = src->GetPixelFormat ();
  unsigned bytes = spf.GetBitsAllocated () / 8;
  unsigned samples = spf.GetSamplesPerPixel ();
  if ((bytes != 1 && bytes != 2) || (samples != 1 && samples != 3))
    return fail (err, HL_ERR_PARSE, path, _("its pixel layout is not supported"));
  size_t len = src->GetBufferLength ();
  size_t frame_samples = (size_t) h.rows * h.cols * samples;
  if (len < frame_samples * bytes)
    return fail (err, HL_ERR_PARSE, path, _("its pixel data is shorter than its image size"));
  try
    {
      buffer.resize (len);
    }
  catch (const std::bad_alloc &)
    {
      return hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory reading \"%s\""), path);
    }
  if (!src->GetBuffer (buffer.data ()))
    {
      char msg[256];
      snprintf (msg, sizeof msg,
                _("its pixels could not be decoded (transfer syntax %s: damaged, "
                  "truncated or a compression this program cannot decode)"),
                gdcm::TransferSyntax::GetTSString (src->GetTransferSyntax ()));
      return fail (err, HL_ERR_PARSE, path, msg);
    }

  HlGrayImage *img = hl_gray_image_alloc (HL_IMAGE_FORMAT_DICOM, (int) h.cols, (int) h.rows);
  if (img == nullptr)
    return hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory reading \"%s\""), path);
  img->frames = (int) h.frames;
  std::string pis = read_code (ds, 0x0028, 0x0004);
  if (pis.empty ())
    pis = gdcm::PhotometricInterpretation::GetPIString (pi) ? gdcm::PhotometricInterpretation::GetPIString (pi) : "";
  snprintf (img->photometric, sizeof img->photometric, "%s", pis.c_str ());

  st = read_spacing (path, ds, &img->spacing, err);
  if (st != HL_OK)
    {
      hl_gray_image_free (img);
      return st;
    }
  img->burned_in_annotation = read_code (ds, 0x0028, 0x0301) == "YES";

  /* Rescale. */
  double slope = 1.0, intercept = 0.0, v[VALUES_MAX];
  int n = read_numbers (ds, 0x0028, 0x1053, v, VALUES_MAX);
  if (n < 0 || (n > 0 && v[0] == 0.0))
    {
      hl_gray_image_free (img);
      return hl_error_set (err, HL_ERR_INVALID, path,
                           _("The DICOM file \"%s\": Rescale Slope (0028,1053) is not a "
                             "non-zero number"), path);
    }
  if (n > 0)
    slope = v[0];
  n = read_numbers (ds, 0x0028, 0x1052, v, VALUES_MAX);
  if (n < 0)
    {
      hl_gray_image_free (img);
      return hl_error_set (err, HL_ERR_INVALID, path,
                           _("The DICOM file \"%s\": Rescale Intercept (0028,1052) is not "
                             "a number"), path);
    }
  if (n > 0)
    intercept = v[0];

  const unsigned char *buf = reinterpret_cast<const unsigned char *> (buffer.data ());
  /* Bits stored and high bit as the data set says (GDCM reports a JPEG
   * 2000 stream's own precision instead). */
  unsigned bits_stored = src == &image ? h.bits_stored : spf.GetBitsStored ();
  if (bits_stored == 0 || bits_stored > bytes * 8)
    bits_stored = bytes * 8;
  unsigned high_bit = src == &image ? h.high_bit : spf.GetHighBit ();
  unsigned shift = high_bit + 1 >= bits_stored && high_bit < bytes * 8
                   ? high_bit + 1 - bits_stored : 0;
  bool is_signed = spf.GetPixelRepresentation () == 1;
  img->bits = (int) bits_stored;

  const size_t npx = (size_t) h.rows * h.cols;
  /* Grey as the file's values: one sample, or luminance from colour. */
  std::vector<double> val;
  try
    {
      val.resize (npx);
    }
  catch (const std::bad_alloc &)
    {
      hl_gray_image_free (img);
      return hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory reading \"%s\""), path);
    }
  bool ybr = pi == gdcm::PhotometricInterpretation::YBR_FULL
             && src->GetTransferSyntax ().IsEncapsulated () == false;
  if (samples == 1)
    {
      for (size_t i = 0; i < npx; i++)
        val[i] = slope * raw_value (buf, i, bytes, bits_stored, shift, is_signed) + intercept;
    }
  else
    {
      bool planar = src->GetPlanarConfiguration () == 1;
      for (size_t i = 0; i < npx; i++)
        {
          size_t ir = planar ? i : 3 * i, ig = planar ? npx + i : 3 * i + 1,
                 ib = planar ? 2 * npx + i : 3 * i + 2;
          double r = raw_value (buf, ir, bytes, bits_stored, shift, false);
          double g = raw_value (buf, ig, bytes, bits_stored, shift, false);
          double b = raw_value (buf, ib, bytes, bits_stored, shift, false);
          /* ITU-R BT.601 luma weights (common practice); YBR_FULL's first
           * sample is the luma itself. */
          val[i] = ybr ? r : std::floor (0.299 * r + 0.587 * g + 0.114 * b + 0.5);
        }
      img->colour_converted = true;
    }

  double vmin = val[0], vmax = val[0];
  for (size_t i = 1; i < npx; i++)
    {
      vmin = std::min (vmin, val[i]);
      vmax = std::max (vmax, val[i]);
    }
  /* Held values: the file's values themselves when they are whole numbers
   * in 0..65535; else the range mapped onto 0..65535. */
  bool identity = slope == std::floor (slope) && slope >= 1
                  && intercept == std::floor (intercept) && vmin >= 0 && vmax <= 65535;
  double top;
  if (identity)
    {
      img->value_offset = 0.0;
      img->value_scale = 1.0;
      top = bits_stored >= 16 ? 65535.0 : std::max (vmax, (double) ((1u << bits_stored) - 1u));
      top = std::min (top, 65535.0);
    }
  else
    {
      img->value_offset = vmin;
      img->value_scale = vmax > vmin ? (vmax - vmin) / 65535.0 : 1.0;
      top = 65535.0;
    }
  img->turned_over = pis == "MONOCHROME1";
  for (size_t i = 0; i < npx; i++)
    {
      double hv = (val[i] - img->value_offset) / img->value_scale;
      if (img->turned_over)
        hv = top - hv;
      hv = std::floor (hv + 0.5);
      img->pixels[i] = (uint16_t) std::clamp (hv, 0.0, 65535.0);
    }

  /* The file's first window preset, in held values. */
  double wc[VALUES_MAX], ww[VALUES_MAX];
  int nc = read_numbers (ds, 0x0028, 0x1050, wc, VALUES_MAX);
  int nw = read_numbers (ds, 0x0028, 0x1051, ww, VALUES_MAX);
  if (nc > 0 && nw > 0 && ww[0] > 0)
    {
      double c = (wc[0] - img->value_offset) / img->value_scale;
      img->file_window_centre = img->turned_over ? top - c : c;
      img->file_window_width = ww[0] / img->value_scale;
      img->has_file_window = std::isfinite (img->file_window_centre)
                             && std::isfinite (img->file_window_width);
    }

  std::string note;
  if (h.frames > 1)
    {
      char buf2[128];
      snprintf (buf2, sizeof buf2, _("The first of %lld frames is shown."), h.frames);
      note += buf2;
    }
  if (img->colour_converted)
    {
      if (!note.empty ())
        note += " ";
      note += _("The colour image was converted to grey.");
    }
  snprintf (img->note, sizeof img->note, "%s", note.c_str ());
  *out = img;
  return HL_OK;
}

}  // namespace

extern "C" bool
hl_dicom_available (void)
{
  return true;
}

/* ---- Reading in a child process ------------------------------------------
 *
 * GDCM asserts (and so aborts the whole program), or tries to allocate
 * gigabytes, on some damaged files that no check before it can tell apart
 * from good ones (fuzzing found such files).  A plan with unsaved work must
 * never go down with a radiograph, so the file is read in a child process
 * that hands back the image through a pipe; when the child dies, the file
 * is refused with a message and the program goes on. */

/* The child's address space, on top of what it inherits from the parent.
 * A damaged length makes GDCM allocate (and fill) what the length says,
 * gigabytes from a file of a few hundred bytes, so the budget grows in two
 * stages: the header pass gets HEADER_BASE plus twice the file (no element
 * before the pixel data can be longer than the file); the decoding then
 * gets HEADER_BASE, four times the file and six times the decoded size the
 * header declared (GDCM holds the file's pixel data, its decoded buffer
 * and the frames, and we copy and convert: a 100-megapixel 16-bit file,
 * plain or RLE, peaks at about seven times its decoded size in resident
 * memory, measured), and never more than HARD in all.  Not set under
 * AddressSanitizer, whose shadow memory needs a huge address space (the
 * fuzz runs cap single allocations instead). */
#define HL_DICOM_CHILD_HEADER_BASE (256ull << 20)
#define HL_DICOM_CHILD_ADDRESS_SPACE_HARD (3ull << 30)

[[maybe_unused]] static unsigned long long child_vm_bytes;   /* inherited at the fork */
static unsigned long long child_file_bytes;

#if defined(__SANITIZE_ADDRESS__)
#define HL_DICOM_ASAN 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define HL_DICOM_ASAN 1
#endif
#endif
#ifdef HL_DICOM_ASAN
#include <sanitizer/common_interface_defs.h>
#endif

static bool
write_all (int fd, const void *data, size_t n)
{
  const char *p = static_cast<const char *> (data);
  while (n > 0)
    {
      ssize_t w = write (fd, p, n);
      if (w < 0 && errno == EINTR)
        continue;
      if (w <= 0)
        return false;
      p += w;
      n -= static_cast<size_t> (w);
    }
  return true;
}

/* The time the parent waits for the child, from the fork to the last
 * byte: generous (a 100-megapixel JPEG 2000 decodes in a few seconds), and
 * HIPLEVER_DICOM_TIMEOUT=SECONDS (a positive number, at most a day) sets
 * another, e.g. for the tests. */
#define HL_DICOM_TIMEOUT_DEFAULT_S 60.0

static double
child_timeout_seconds (void)
{
  const char *env = getenv ("HIPLEVER_DICOM_TIMEOUT");
  if (env == nullptr || *env == '\0')
    return HL_DICOM_TIMEOUT_DEFAULT_S;
  std::istringstream in (env);
  in.imbue (std::locale::classic ());
  double v;
  in >> v;
  if (in.fail () || !in.eof () || !std::isfinite (v) || v <= 0 || v > 86400)
    return HL_DICOM_TIMEOUT_DEFAULT_S;
  return v;
}

static double
now_seconds (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return static_cast<double> (ts.tv_sec) + 1e-9 * static_cast<double> (ts.tv_nsec);
}

/* Reads n bytes before `deadline` (now_seconds()): false at the end of the
 * pipe, on an error, or (with *timed_out set) when the deadline passes. */
static bool
read_all (int fd, void *data, size_t n, double deadline, bool *timed_out)
{
  char *p = static_cast<char *> (data);
  while (n > 0)
    {
      double left = deadline - now_seconds ();
      if (left <= 0)
        {
          *timed_out = true;
          return false;
        }
      struct pollfd pfd = { fd, POLLIN, 0 };
      int ms = left > 3600.0 ? 3600 * 1000 : static_cast<int> (std::ceil (left * 1000.0));
      int pr = poll (&pfd, 1, ms);
      if (pr < 0 && errno == EINTR)
        continue;
      if (pr < 0)
        return false;
      if (pr == 0)
        continue;               /* the deadline is checked above */
      ssize_t r = read (fd, p, n);
      if (r < 0 && (errno == EINTR || errno == EAGAIN))
        continue;
      if (r <= 0)
        return false;
      p += r;
      n -= static_cast<size_t> (r);
    }
  return true;
}

static HlStatus
read_guarded (const char *path, HlGrayImage **out, HlError *err)
{
  try
    {
      return read_image (path, out, err);
    }
  catch (const std::bad_alloc &)
    {
      return hl_error_set (err, HL_ERR_NOMEM, path, _("Out of memory reading \"%s\""), path);
    }
  catch (...)
    {
      return fail (err, HL_ERR_PARSE, path, _("it is damaged (the DICOM reader gave up)"));
    }
}

/* Sets the soft address-space limit to the inherited size plus BUDGET,
 * under the hard limit set at the start. */
static void
child_set_budget (unsigned long long budget)
{
#ifndef HL_DICOM_ASAN
  unsigned long long soft = child_vm_bytes + std::min (budget, HL_DICOM_CHILD_ADDRESS_SPACE_HARD);
  struct rlimit lim;
  if (getrlimit (RLIMIT_AS, &lim) != 0)
    return;
  if (lim.rlim_max != RLIM_INFINITY && soft > lim.rlim_max)
    soft = lim.rlim_max;
  lim.rlim_cur = soft;
  setrlimit (RLIMIT_AS, &lim);
#else
  (void) budget;
#endif
}

static void
child_allow_decoding (unsigned long long decoded_bytes)
{
  if (child_file_bytes == 0)        /* not in the reading child */
    return;
  child_set_budget (HL_DICOM_CHILD_HEADER_BASE + 4 * child_file_bytes + 6 * decoded_bytes);
}

/* The first stage (see HL_DICOM_CHILD_HEADER_BASE): the hard limit at the
 * inherited size plus HARD, the soft one at the header pass's budget. */
static void
child_limit_memory (const char *path)
{
#ifndef HL_DICOM_ASAN
  long page = sysconf (_SC_PAGESIZE);
  unsigned long long vm_pages = 0;
  FILE *statm = fopen ("/proc/self/statm", "re");
  if (statm != nullptr)
    {
      if (fscanf (statm, "%llu", &vm_pages) != 1)
        vm_pages = 0;
      fclose (statm);
    }
  child_vm_bytes = vm_pages * (unsigned long long) (page > 0 ? page : 4096);
  struct stat sb;
  child_file_bytes = stat (path, &sb) == 0 && sb.st_size > 0 ? (unsigned long long) sb.st_size : 1;
  struct rlimit lim = { child_vm_bytes + HL_DICOM_CHILD_ADDRESS_SPACE_HARD,
                        child_vm_bytes + HL_DICOM_CHILD_ADDRESS_SPACE_HARD };
  setrlimit (RLIMIT_AS, &lim);
  child_set_budget (HL_DICOM_CHILD_HEADER_BASE + 2 * std::min (child_file_bytes,
                                                               HL_DICOM_CHILD_ADDRESS_SPACE_HARD));
#else
  (void) path;
#endif
}

[[noreturn]] static void
child_read (const char *path, int fd)
{
  /* The child dies plainly: no handler the parent installed (a crash
   * reporter, the fuzzer's) acts on its death as if the parent had died. */
  for (int sig : { SIGABRT, SIGSEGV, SIGBUS, SIGILL, SIGFPE })
    signal (sig, SIG_DFL);
#ifdef HL_DICOM_ASAN
  __sanitizer_set_death_callback (nullptr);
#endif
  /* GDCM's assertion texts (source lines, no element of the file) are
   * not for the user's terminal or log. */
  int devnull = open ("/dev/null", O_WRONLY | O_CLOEXEC);
  if (devnull >= 0)
    {
      dup2 (devnull, STDERR_FILENO);
      close (devnull);
    }
  child_limit_memory (path);
#if HL_TEST_HOOKS
  /* Test hook: a reader that hangs, for the parent's time limit. */
  const char *hang = getenv ("HIPLEVER_TEST_DICOM_CHILD_SLEEP");
  if (hang != nullptr && atoi (hang) > 0)
    sleep (static_cast<unsigned> (atoi (hang)));
#endif
  HlGrayImage *img = nullptr;
  HlError e;
  hl_error_clear (&e);
  HlStatus st = read_guarded (path, &img, &e);
  bool ok = write_all (fd, &st, sizeof st) && write_all (fd, &e, sizeof e);
  if (ok && st == HL_OK)
    {
      HlGrayImage head = *img;
      head.pixels = nullptr;
      ok = write_all (fd, &head, sizeof head)
           && write_all (fd, img->pixels, sizeof (uint16_t) * static_cast<size_t> (img->width)
                                              * static_cast<size_t> (img->height));
    }
  /* _exit: none of the parent's exit handlers (GTK, the sanitizers' leak
   * check of a copied heap) run in the child. */
  _exit (ok ? 0 : 1);
}

static void
kill_and_reap (pid_t pid)
{
  kill (pid, SIGKILL);
  while (waitpid (pid, nullptr, 0) < 0 && errno == EINTR)
    ;
}

static HlStatus
child_failed (const char *path, HlError *err)
{
  return fail (err, HL_ERR_PARSE, path,
               _("the DICOM reader failed on it (the file is probably damaged)"));
}

extern "C" HlStatus
hl_dicom_read (const char *path, HlGrayImage **out, HlError *err)
{
  *out = nullptr;
  /* GDCM's warnings could quote elements of the file: never print them. */
  gdcm::Trace::SetDebug (false);
  gdcm::Trace::SetWarning (false);
  gdcm::Trace::SetError (false);

  int fds[2];
  if (pipe2 (fds, O_CLOEXEC) != 0)
    return hl_error_set (err, HL_ERR_IO, path, _("Cannot read \"%s\": %s"), path,
                         strerror (errno));
  pid_t pid = fork ();
  if (pid < 0)
    {
      int e = errno;
      close (fds[0]);
      close (fds[1]);
      return hl_error_set (err, HL_ERR_IO, path, _("Cannot read \"%s\": %s"), path,
                           strerror (e));
    }
  if (pid == 0)
    {
      close (fds[0]);
      child_read (path, fds[1]);
    }
  close (fds[1]);

  const double timeout = child_timeout_seconds ();
  const double deadline = now_seconds () + timeout;
  bool timed_out = false;
  HlStatus st = HL_ERR_PARSE;
  HlError e;
  hl_error_clear (&e);
  HlGrayImage head;
  HlGrayImage *img = nullptr;
  bool ok = read_all (fds[0], &st, sizeof st, deadline, &timed_out)
            && read_all (fds[0], &e, sizeof e, deadline, &timed_out);
  if (ok && st == HL_OK)
    {
      ok = read_all (fds[0], &head, sizeof head, deadline, &timed_out)
           && head.width > 0 && head.height > 0
           && static_cast<double> (head.width) * head.height <= 1e9;
      if (ok)
        {
          size_t n = static_cast<size_t> (head.width) * static_cast<size_t> (head.height);
          img = static_cast<HlGrayImage *> (calloc (1, sizeof *img));
          uint16_t *px = static_cast<uint16_t *> (malloc (n * sizeof (uint16_t)));
          if (img == nullptr || px == nullptr)
            {
              free (img);
              free (px);
              img = nullptr;
              close (fds[0]);
              kill_and_reap (pid);
              return hl_error_set (err, HL_ERR_NOMEM, path,
                                   _("Out of memory reading \"%s\""), path);
            }
          *img = head;
          img->pixels = px;
          ok = read_all (fds[0], px, n * sizeof (uint16_t), deadline, &timed_out);
        }
    }
  close (fds[0]);
  if (timed_out)
    {
      /* A reader that hangs (a damaged file GDCM loops on, or a lock held
       * at the fork) is stopped; the window and its plan go on. */
      kill_and_reap (pid);
      if (img != nullptr)
        hl_gray_image_free (img);
      char secs[32];
      snprintf (secs, sizeof secs, "%g", timeout);
      char msg[512];
      snprintf (msg, sizeof msg,
                _("reading the DICOM file took longer than %s s; the reader was stopped "
                  "(the file may be damaged, or the computer too busy: try again, or set "
                  "HIPLEVER_DICOM_TIMEOUT to more seconds)"), secs);
      return fail (err, HL_ERR_IO, path, msg);
    }
  int status = 0;
  while (waitpid (pid, &status, 0) < 0 && errno == EINTR)
    ;
  bool child_ok = WIFEXITED (status) && WEXITSTATUS (status) == 0;
  if (!ok || !child_ok)
    {
      if (img != nullptr)
        hl_gray_image_free (img);
      if (ok && st != HL_OK)      /* a refusal the child could say */
        {
          if (err != nullptr)
            *err = e;
          return st;
        }
      return child_failed (path, err);
    }
  if (st != HL_OK)
    {
      if (err != nullptr)
        *err = e;
      return st;
    }
  *out = img;
  return HL_OK;
}
