/* The pin table and the pin matrix: what every pin drives, named with the
 * description's own names, for pins.csv, pin-matrix.csv, the firmware map
 * and the proof.  One naming for all of them:
 *
 * - a block dot is "R3C12": dot row 3 from the top (over all the block's
 *   lines), dot column 12 from the left (over all its cells); with more
 *   than one block, "NAME:R3C12";
 * - a digit part is its digit and part, upper case: "1A", "2DP", "3G1";
 *   a colon "COL" (with its digit before it, "2COL", when the row has
 *   more than one); the sign unit's parts "MINUS", "ONE"; with more than
 *   one digit row, "NAME:1A";
 * - an icon is its name as written, "rec". */
#ifndef GP_PINTABLE_H
#define GP_PINTABLE_H

#include "stage.h"

#include <stdbool.h>
#include <stddef.h>

/* The label of one pixel, as above. */
void gp_pixel_label(const struct gp_build *build, const struct gp_pixel *px,
		    char *out, size_t size);

/* What a net drives, in words: "block main line 1 row 3", "block main
 * cell 2 column 4", "digits clock 1A 1F", "icons rec battery", several
 * kinds joined by "; ".  Appends to out. */
void gp_net_drives(const struct gp_build *build, int net,
		   struct gp_buffer *out);

/* The routed pins in number order; free() the list; NULL when out of
 * memory. */
const struct gp_pin **gp_pins_in_order(const struct gp_build *build);

/* One row per pin, one column per common: cells[row * commons + k] names
 * what lights where pin row crosses COM(k+1) (labels joined by a space),
 * or, on a common's own pin, that common's name; "" elsewhere. */
struct gp_pin_matrix {
	size_t rows, commons;
	const struct gp_pin **pins;   /* rows of them, in number order */
	struct gp_buffer *cells;      /* rows x commons */
};
bool gp_pin_matrix_init(struct gp_pin_matrix *matrix,
			const struct gp_build *build);
void gp_pin_matrix_finish(struct gp_pin_matrix *matrix);
/* The text of one cell ("" when nothing lights there). */
const char *gp_pin_matrix_cell(const struct gp_pin_matrix *matrix,
			       size_t row, size_t common);
/* pin-matrix.csv: "pin,net,COM1,...,COMn", then a row per pin (RFC
 * 4180, CRLF). */
bool gp_pin_matrix_csv(const struct gp_build *build, struct gp_buffer *out);

#endif
