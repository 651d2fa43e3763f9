/* hl-template-tool.h: editing an option's implant template on the canvas.
 *
 * Copyright 2026 the hiplever developers
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * Connects the canvas's template signals (hl-canvas.h) to the document:
 * dragging the cup moves its centre, dragging the inclination handle turns
 * its face line, dragging the stem slides it along the femoral shaft axis
 * (the seat); arrow keys nudge the selected handle (0.5 mm or degree,
 * Shift 5), Page Up and Page Down step the cup or stem size.  A whole drag
 * is one undo step, as is each key.  The geometry (inclination from a
 * pointer, seat from a movement, the next size) is the core's
 * (hl-template-shape.h).
 */
#pragma once

#include <gtk/gtk.h>
#include "hl-canvas.h"
#include "hl-document.h"

G_BEGIN_DECLS

void     hl_template_tool_attach (HlCanvas *canvas, HlDocument *document);

/* Puts `tmpl` into option `index` of the document's plan as one undo step
 * (`field` non-NULL: coalesced with the previous edit of the same field),
 * resolved against its catalogue in the registry.  On a template the
 * catalogue cannot take (a size it lacks) nothing changes, the document's
 * "error" signal says why and FALSE is returned. */
gboolean hl_template_edit (HlDocument *document, int index, const HlTemplate *tmpl,
                           const char *field);

G_END_DECLS
