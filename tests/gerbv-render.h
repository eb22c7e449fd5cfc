/* Test helper: render a Gerber file with the independent reader gerbv and
 * measure what it drew.
 *
 * gerbv (2.9, Debian package) is run headless as
 *   gerbv -x png --dpi=DPI --border=0 --origin=OXxOY --window=WxH
 *         --background=#ffffff --foreground=#000000 -o PNG FILE
 * with a window placed in the glass frame, so every dark pixel maps back to
 * a place in millimetres.  gerbv exits 0 even on errors, so its stderr is
 * read: every non-blank line is a complaint except gerbv's exact note
 * about an X2 attribute command (gerbv_known_note).  The PNG is read back with cairo
 * and its dark pixels (no antialiasing: each pixel is dark or light) are
 * counted and bounded. */
#ifndef GERBV_RENDER_H
#define GERBV_RENDER_H

#include <stdbool.h>
#include <stddef.h>

/* Is line gerbv 2.9's note about an attribute command, exactly
 * "Unknown RS-274X extension found %TF% at line N in file \"PATH\""
 * (or %TA%, %TO%, %TD%) after its log prefix? */
bool gerbv_known_note(const char *line);

struct gerbv_frame {
	/* Part of the glass frame to render, millimetres; the helper widens
	 * it to whole pixels plus a margin of `margin_px` pixels. */
	double x0, y0, x1, y1;
	double dpi;
	int margin_px;
};

struct gerbv_result {
	int width, height;        /* PNG size, pixels */
	double pixel_mm;          /* side of one pixel, mm */
	long dark;                /* number of dark pixels */
	double area_mm2;          /* dark * pixel_mm^2 */
	bool any_dark;
	double x0, y0, x1, y1;    /* extent of the dark pixels, mm */
	bool dark_on_border;      /* drawing may run past the window */
	int known_notes;          /* attribute notes seen (and ignored) */
	char *complaints;         /* other stderr lines, "" when none; owned */
	/* the window: one byte per pixel, 1 where dark, rows from the top */
	unsigned char *mask;
	double left_mm, top_mm;   /* corner of the window in the glass frame */
};

/* Is the pixel that holds (x, y) mm dark?  False outside the window. */
bool gerbv_result_dark_at(const struct gerbv_result *result, double x,
			  double y);

/* Renders gbr with gerbv (program path or name, NULL for "gerbv") into
 * png and measures it.  False when gerbv could not be run or no PNG came
 * out; err then says why.  A rendering with complaints still returns true:
 * look at result->complaints. */
bool gerbv_render(const char *gerbv, const char *gbr, const char *png,
		  const struct gerbv_frame *frame, struct gerbv_result *result,
		  char *err, size_t err_size);
void gerbv_result_finish(struct gerbv_result *result);

/* What the drawing should be, to compare with a rendering. */
struct gerbv_expect {
	double area_mm2;          /* < 0: do not check */
	/* Total length of every boundary (outer rings and holes, and both
	 * sides of strokes), mm.  The area may differ by up to one pixel
	 * along the whole boundary: perimeter * pixel_mm. */
	double perimeter_mm;
	double x0, y0, x1, y1;    /* extent, mm; check_extent says whether */
	bool check_extent;
};

/* Compares; false with a one-line reason in why when the rendering has
 * complaints, or its area or extent disagree beyond the render
 * resolution (area: perimeter * pixel + 1 pixel; extent: 1.5 pixels). */
bool gerbv_compare(const struct gerbv_result *result,
		   const struct gerbv_expect *expect, char *why,
		   size_t why_size);

#endif
