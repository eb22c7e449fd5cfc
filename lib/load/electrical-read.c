/* The 'electrical' section: what the electrical checks need, defaulting
 * to the checks' own limits (findings.h). */
#include "model.h"

#include "findings.h"

#include <string.h>

void gp_electrical_defaults(struct gp_electrical *e)
{
	struct gp_check_limits l;
	gp_check_limits_default(&l);
	memset(e, 0, sizeof(*e));
	e->sheet_resistance[GP_PLATE_FRONT] = l.sheet_resistance[GP_PLATE_FRONT];
	e->sheet_resistance[GP_PLATE_BACK] = l.sheet_resistance[GP_PLATE_BACK];
	e->cell_gap = (int64_t)(l.cell_gap * 1e9 + 0.5);
	e->permittivity = l.permittivity;
}

/* sheet_resistance: one number for both plates, or {front: .., back: ..} */
static bool read_sheet(struct gp_reader *r, struct gp_electrical *e)
{
	const struct gp_node *node = gp_read_node(r, "sheet_resistance", false);
	if (!node)
		return true;
	if (node->kind == GP_NODE_SCALAR) {
		double v = 0;
		if (!gp_node_double(node, r->diag, 0.1, 1e6, &v))
			return r->ok = false;
		e->sheet_resistance[0] = e->sheet_resistance[1] = v;
		return true;
	}
	struct gp_reader sub;
	gp_reader_begin(&sub, node, "'electrical.sheet_resistance'", r->diag);
	gp_read_double(&sub, "front", false, 0.1, 1e6,
		       &e->sheet_resistance[GP_PLATE_FRONT]);
	gp_read_double(&sub, "back", false, 0.1, 1e6,
		       &e->sheet_resistance[GP_PLATE_BACK]);
	return r->ok &= gp_reader_end(&sub);
}

bool gp_electrical_read(struct gp_design *design, const struct gp_node *node,
			struct gp_diag *diag)
{
	struct gp_electrical *e = &design->electrical;
	struct gp_reader r;
	gp_reader_begin(&r, node, "'electrical'", diag);
	e->given = true;
	e->where = node->where;
	read_sheet(&r, e);
	gp_read_size(&r, "cell_gap", false, &e->cell_gap);
	gp_read_double(&r, "permittivity", false, 1, 100, &e->permittivity);
	gp_read_double(&r, "max_lead_resistance", false, 0, 1e9,
		       &e->max_lead_resistance);
	gp_read_size(&r, "conductor_pitch", false, &e->conductor_pitch);
	return gp_reader_end(&r);
}
