/* Test helper: the netlist of a glass read back from its written files
 * alone, without the layout's data.
 *
 * The front, back and transfer Gerber files are read with the strict
 * reader (gerber-read.h) and turned into polygons with GEOS directly
 * (regions made valid, draws and flashes buffered by their apertures);
 * each plate's ITO is unioned into pieces; the pads are the flashes of
 * rectangular apertures; a transfer dot joins the pieces of both plates it
 * touches.  pins.csv names each pad (by its centre) and glass-map.h,
 * compiled into a small program, lists the (common pin, segment pin) of
 * every element.  The checks (issue 13): every pad reaches exactly one
 * piece on its own plate and at most one on the other, no two pads reach
 * the same piece (no shorts), every piece inside the seal reaches a pad (no
 * opens), and the pairs of pads whose pieces overlap inside the seal are
 * exactly the pairs glass-map.h lists. */
#ifndef READBACK_H
#define READBACK_H

#include "geom.h"
#include "output.h"

#include <stdbool.h>
#include <stddef.h>

/* Checks the outputs in set; `inside` is the box inside the seal (from the
 * description: the viewing area grown by the seal's distance), `work` a
 * folder for the compiled probe.  False with why (one line) filled in. */
bool readback_check(const struct gp_output_set *set, struct gp_box inside,
		    const char *work, char *why, size_t size);

#endif
