/* The default limits of the checks, beside the plain data they fill
 * (findings.h): the description's 'rules' and 'electrical' sections
 * start from them. */
#include "findings.h"

#include <string.h>

void gp_check_limits_default(struct gp_check_limits *l)
{
	memset(l, 0, sizeof(*l));
	/* geometry: common practice, no published source */
	l->min_line = 30 * 1000;
	l->min_space = 30 * 1000;
	l->registration = 100 * 1000;
	l->edge_clearance = 500 * 1000;
	l->chord_tolerance = 1000;
	/* our own choice, no published source: 5% of a pixel, lost at its
	 * edge, is hard to see; notches where leads and bridges cross a
	 * back patch cost a few per cent of a small icon */
	l->registration_loss = 0.05;
	l->min_overlap_mm2 = 1e-6;     /* 1 um^2: far above 1 nm snapping */
	/* ITO sheet resistance: common practice, no published source
	 * (passive LCD glass is usually ordered at 10 to 100 ohm/square) */
	l->sheet_resistance[GP_PLATE_FRONT] = 30;
	l->sheet_resistance[GP_PLATE_BACK] = 30;
	/* cell gap 6 um and relative permittivity 7: from memory, typical
	 * of TN cells (the fluid's parallel and perpendicular permittivities
	 * straddle it) */
	l->cell_gap = 6e-6;
	l->permittivity = 7;
	/* a row time of 10 tau settles to within 0.005%, 3 tau only to 95%:
	 * common practice, no published source */
	l->rc_warning = 10;
	l->rc_error = 3;
	l->spread_warning = 2;
	l->plate[0] = l->plate[1] = l->viewing = gp_box_none();
	l->seal_inside = gp_box_none();
	l->min_conductors = 2;
	for (int p = 0; p < 2; p++)
		for (int s = 0; s < 4; s++)
			l->pad_clearance[p][s] = -1;
}
