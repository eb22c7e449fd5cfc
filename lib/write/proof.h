/* The PDF proof: the drawing a reviewer holds against the mechanical
 * drawing.  Written with cairo's PDF surface into a buffer.
 *
 * Conventions of the drawing: millimetres; every sheet is drawn in the
 * glass frame as seen from the viewer (x right, y up); the overview, the
 * layer sheets, the findings sheet and the lit previews share one scale and
 * one placement, so printed sheets can be laid over each other.  Paper
 * coordinates below are millimetres from the top-left corner of the sheet,
 * y down (as pdftotext -bbox and pdftoppm count). */
#ifndef GP_PROOF_H
#define GP_PROOF_H

#include "stage.h"
#include "buffer.h"
#include "diag.h"

#include <cairo.h>
#include <stdbool.h>

/* Where things are on the sheets; computed before anything is drawn. */
struct gp_proof_plan {
	const char *paper_name;   /* "A3", "Tabloid" */
	bool landscape;
	double paper_w, paper_h;  /* mm, as the sheet lies */
	/* Overview scale num:den (1:1, 1:2, ...); paper mm per glass mm. */
	int scale_num, scale_den;
	double scale;
	/* Glass to paper on the overview-like sheets:
	 * paper x = ox + scale * x_mm, paper y = oy - scale * y_mm. */
	double ox, oy;
	/* Left end of the 100 mm ruler's baseline on the overview; the band
	 * above the title block holding it and the legend. */
	double ruler_x, ruler_y;
	double foot_h, note_h;
	double legend_x, legend_y, legend_column_w;
	int legend_columns;
	/* Sheet numbers (1-based) and the total. */
	int sheet_overview, sheet_findings, sheet_pins, sheet_spec;
	int sheet_lit, lit_sheets, sheet_count;
	int sheet_details, detail_sheets, pin_sheets, finding_sheets;
	int spec_sheets;
};

/* The 100 mm ruler: length and the tick spacing. */
#define GP_PROOF_RULER_MM 100

/* Lays the sheets out for build.  Never fails. */
void gp_proof_plan(const struct gp_build *build, struct gp_proof_plan *plan);

/* Appends the whole proof as a PDF to out.  The document carries no
 * time unless SOURCE_DATE_EPOCH is set, which then gives its creation
 * date; the same build gives the same bytes. */
bool gp_proof_write(struct gp_buffer *out, const struct gp_build *build,
		    struct gp_diag *diag);

/* The proof's regular text face, for other drawings made with cairo
 * (cairo's own fontconfig lookup for its toy fonts leaks); shared and
 * never destroyed by the caller; NULL when no font is installed. */
cairo_font_face_t *gp_proof_text_face(void);

#endif
