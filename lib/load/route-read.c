/* Reading the routing sections: ledges, leads, seal, transfers, marks,
 * pins and part_text. */
#include "route-spec.h"

#include "digits-spec.h"
#include "model.h"
#include "units.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Defaults: common practice, no published source. */
#define DEFAULT_LEAD_WIDTH (100 * 1000)      /* 0.1 mm */
#define DEFAULT_SEAL_WIDTH (1000 * 1000)     /* 1 mm */
#define DEFAULT_SEAL_DISTANCE (500 * 1000)   /* 0.5 mm */
#define DEFAULT_PORT_WIDTH (2000 * 1000)     /* 2 mm */
#define DEFAULT_TRANSFER_SIZE (300 * 1000)   /* 0.3 mm dots */
#define DEFAULT_MARK_SIZE (1000 * 1000)      /* 1 mm cross */
#define DEFAULT_MARK_LINE (100 * 1000)
#define DEFAULT_MARK_GAP (50 * 1000)
#define DEFAULT_PAD_LENGTH (2000 * 1000)
#define DEFAULT_TEXT_HEIGHT (800 * 1000)

static const char *const side_names[] = { "bottom", "right", "top", "left",
					  NULL };

const char *gp_side_name(enum gp_side side)
{
	return side < GP_SIDE_COUNT ? side_names[side] : "?";
}

static bool read_connection(struct gp_ledge *l, const struct gp_node *node,
			    struct gp_diag *diag)
{
	static const char *const methods[] = { "elastomeric", "pins",
					       "heat_seal", NULL };
	char what[160];
	snprintf(what, sizeof(what), "'connection' of ledge '%s'", l->name);
	struct gp_reader r;
	int method = GP_LEDGE_ELASTOMERIC;
	l->connection_where = node->where;
	gp_reader_begin(&r, node, what, diag);
	gp_read_choice(&r, "method", true, methods, &method);
	l->connection = (enum gp_ledge_connection)method;
	gp_read_size(&r, "pitch", l->connection == GP_LEDGE_PINS,
		     &l->connector_pitch);
	return gp_reader_end(&r);
}

/* "right"/"left" along a bottom or top ledge, "up"/"down" along a side. */
static bool read_numbering(struct gp_reader *r, struct gp_ledge *l)
{
	static const char *const ways[] = { "right", "left", "up", "down",
					    NULL };
	bool across = l->side == GP_SIDE_BOTTOM || l->side == GP_SIDE_TOP;
	int way = across ? 0 : 3;
	const struct gp_node *node = gp_read_node(r, "numbering", false);
	if (!gp_read_choice(r, "numbering", false, ways, &way))
		return false;
	if (node && across != (way < 2))
		return gp_diag_error(r->diag, &node->where,
				     "'numbering' of a %s ledge runs %s; "
				     "expected %s",
				     gp_side_name(l->side), ways[way],
				     across ? "'right' or 'left'"
					    : "'up' or 'down'");
	l->direction = way == 0 || way == 2 ? 1 : -1;
	return true;
}

/* carries: [NAME, ...]: elements (blocks, digit rows, icons) and nets
 * (COMn, SEGn) by name.  Element names are checked here; net names once
 * the layout has made the nets (ledge.c). */
static bool known_element(const struct gp_design *design, const char *name)
{
	for (size_t i = 0; i < design->block_count; i++)
		if (strcmp(design->blocks[i].name, name) == 0)
			return true;
	for (size_t i = 0; i < design->digit_count; i++)
		if (strcmp(design->digits[i].name, name) == 0)
			return true;
	for (size_t i = 0; i < design->icon_count; i++)
		if (strcmp(design->icons[i].name, name) == 0)
			return true;
	return false;
}

static bool net_name_form(const char *name)
{
	size_t n = strncmp(name, "COM", 3) == 0 || strncmp(name, "SEG", 3) == 0
			   ? 3 : 0;
	if (!n || name[n] < '1' || name[n] > '9')
		return false;
	for (const char *c = name + n; *c; c++)
		if (*c < '0' || *c > '9')
			return false;
	return true;
}

static bool read_carries_list(const struct gp_design *design,
			      struct gp_ledge *l, const struct gp_node *list,
			      struct gp_diag *diag)
{
	bool ok = true;
	if (list->count == 0)
		return gp_diag_error(diag, &list->where,
				     "'carries' of ledge '%s' is an empty "
				     "list; name elements or nets, or use "
				     "all, commons or segments", l->name);
	for (size_t k = 0; k < list->count; k++) {
		const struct gp_node *item = list->items[k];
		if (!gp_node_expect_scalar(item, diag)) {
			ok = false;
			continue;
		}
		if (known_element(design, item->text) ||
		    net_name_form(item->text) ||
		    strcmp(item->text, "commons") == 0 ||
		    strcmp(item->text, "segments") == 0)
			continue;
		const char *names[64];
		size_t n = 0;
		for (size_t i = 0; i < design->block_count && n < 64; i++)
			names[n++] = design->blocks[i].name;
		for (size_t i = 0; i < design->digit_count && n < 64; i++)
			names[n++] = design->digits[i].name;
		for (size_t i = 0; i < design->icon_count && n < 64; i++)
			names[n++] = design->icons[i].name;
		const char *near = n ? gp_nearest_word(item->text, names, n)
				     : NULL;
		ok = gp_diag_error(diag, &item->where,
				   "'carries' of ledge '%s' names '%s', which "
				   "is no block, digit row, icon, net "
				   "(COMn, SEGn), commons or segments%s%s%s", l->name, item->text,
				   near ? "; did you mean '" : "",
				   near ? near : "", near ? "'?" : "");
	}
	l->carries = GP_CARRIES_LISTED;
	l->carries_list = list;
	return ok;
}

static bool read_ledge(struct gp_design *design, struct gp_ledge *l,
		       const char *name, const struct gp_node *node,
		       struct gp_diag *diag)
{
	static const char *const plates[] = { "front", "back", NULL };
	static const char *const carries[] = { "all", "commons", "segments",
					       NULL };
	char what[160];
	snprintf(what, sizeof(what), "ledge '%s'", name);
	struct gp_reader r;
	memset(l, 0, sizeof(*l));
	l->name = name;
	l->where = node->where;
	gp_reader_begin(&r, node, what, diag);
	if (!r.map)
		return gp_reader_end(&r);
	int side = GP_SIDE_BOTTOM, plate = GP_PLATE_FRONT, carry = 0;
	gp_read_choice(&r, "side", true, side_names, &side);
	l->side = (enum gp_side)side;
	l->plate_given = gp_read_node(&r, "plate", false) != NULL;
	gp_read_choice(&r, "plate", false, plates, &plate);
	l->plate = (enum gp_plate)plate;
	const struct gp_node *c = gp_read_node(&r, "connection", false);
	if (c)
		r.ok &= read_connection(l, c, diag);
	gp_read_size(&r, "pitch", l->connection != GP_LEDGE_PINS,
		     &l->pitch);
	if (l->pitch == 0)
		l->pitch = l->connector_pitch;
	l->pad_width = l->pitch / 2;
	l->pad_length = DEFAULT_PAD_LENGTH;
	l->edge_clearance = design->rules.edge_clearance;
	gp_read_size(&r, "pad_width", false, &l->pad_width);
	gp_read_size(&r, "pad_length", false, &l->pad_length);
	gp_read_length(&r, "edge_clearance", false, &l->edge_clearance);
	l->pin1_given = gp_read_node(&r, "pin1", false) != NULL;
	gp_read_length(&r, "pin1", false, &l->pin1);
	r.ok &= read_numbering(&r, l);
	gp_read_int(&r, "first_pin", false, 1, 99999, &l->first_pin);
	const struct gp_node *list = gp_read_node(&r, "carries", false);
	if (list && list->kind == GP_NODE_SEQUENCE) {
		r.ok &= read_carries_list(design, l, list, diag);
	} else {
		gp_read_choice(&r, "carries", false, carries, &carry);
		l->carries = (enum gp_carries)carry;
	}
	if (l->edge_clearance < 0)
		return gp_diag_error(diag, &node->where,
				     "ledge '%s': 'edge_clearance' must not "
				     "be negative",
				     name);
	return gp_reader_end(&r);
}

static bool read_ledges(struct gp_design *design, struct gp_routing *g,
			const struct gp_node *node, struct gp_diag *diag)
{
	if (!gp_node_expect_map(node, diag))
		return false;
	if (node->count == 0 || node->count > GP_MAX_LEDGES)
		return gp_diag_error(diag, &node->where,
				     "expected from 1 to %d ledges, got %zu",
				     GP_MAX_LEDGES, node->count);
	bool ok = true;
	for (size_t i = 0; i < node->count; i++)
		ok &= read_ledge(design, &g->ledges[i], node->keys[i]->text,
				 node->items[i], diag);
	g->ledge_count = ok ? node->count : 0;
	return ok;
}

static bool read_leads(struct gp_design *design, struct gp_leads_spec *l,
		       const struct gp_node *node, struct gp_diag *diag)
{
	static const char *const exits[] = { "auto", "left", "right", "split",
					     NULL };
	struct gp_reader r;
	int exit = GP_COMMONS_AUTO;
	l->where = node->where;
	gp_reader_begin(&r, node, "'leads'", diag);
	gp_read_size(&r, "width", false, &l->width);
	gp_read_size(&r, "space", false, &l->space);
	gp_read_choice(&r, "commons", false, exits, &exit);
	l->commons = (enum gp_commons_exit)exit;
	bool ok = gp_reader_end(&r);
	char a[32], b[32];
	if (ok && l->width < design->rules.min_line) {
		gp_format_mm_short(a, sizeof(a), l->width);
		gp_format_mm_short(b, sizeof(b), design->rules.min_line);
		return gp_diag_error(diag, &node->where,
				     "lead 'width' %s mm is below the "
				     "rules' 'min_line' %s mm",
				     a, b);
	}
	if (ok && l->space < design->rules.min_space) {
		gp_format_mm_short(a, sizeof(a), l->space);
		gp_format_mm_short(b, sizeof(b), design->rules.min_space);
		return gp_diag_error(diag, &node->where,
				     "lead 'space' %s mm is below the "
				     "rules' 'min_space' %s mm",
				     a, b);
	}
	return ok;
}

static bool read_port(struct gp_seal_spec *s, const struct gp_node *node,
		      struct gp_diag *diag)
{
	struct gp_reader r;
	int side = s->port_side;
	s->port_where = node->where;
	gp_reader_begin(&r, node, "'fill_port' of the seal", diag);
	s->port_side_given = gp_read_node(&r, "side", false) != NULL;
	gp_read_choice(&r, "side", false, side_names, &side);
	s->port_side = (enum gp_side)side;
	s->port_position_given = gp_read_node(&r, "position", false) != NULL;
	gp_read_length(&r, "position", false, &s->port_position);
	gp_read_size(&r, "width", false, &s->port_width);
	return gp_reader_end(&r);
}

static bool read_seal(struct gp_seal_spec *s, const struct gp_node *node,
		      struct gp_diag *diag)
{
	struct gp_reader r;
	s->given = true;
	s->where = node->where;
	s->port_where = node->where;
	gp_reader_begin(&r, node, "'seal'", diag);
	gp_read_size(&r, "width", false, &s->width);
	gp_read_length(&r, "distance", false, &s->distance);
	const struct gp_node *port = gp_read_node(&r, "fill_port", false);
	if (port)
		r.ok &= read_port(s, port, diag);
	if (s->distance < 0)
		return gp_diag_error(diag, &node->where,
				     "seal 'distance' must not be negative");
	return gp_reader_end(&r);
}

static bool read_transfers(struct gp_transfer_spec *t,
			   const struct gp_node *node, struct gp_diag *diag)
{
	static const char *const places[] = { "seal", "outside", NULL };
	struct gp_reader r;
	int place = 0;
	t->where = node->where;
	gp_reader_begin(&r, node, "'transfers'", diag);
	gp_read_size(&r, "size", false, &t->size);
	gp_read_int(&r, "count", false, 1, 8, &t->count);
	gp_read_choice(&r, "place", false, places, &place);
	t->outside = place == 1;
	gp_read_length(&r, "margin", false, &t->margin);
	if (t->margin < 0)
		return gp_diag_error(diag, &node->where,
				     "transfer 'margin' must not be negative");
	return gp_reader_end(&r);
}

static bool read_points(const struct gp_node *node, struct gp_marks_spec *m,
			struct gp_diag *diag)
{
	if (!gp_node_expect_sequence(node, 0, diag))
		return false;
	if (node->count == 0 || node->count > GP_MAX_MARKS)
		return gp_diag_error(diag, &node->where,
				     "expected from 1 to %d mark positions, "
				     "got %zu",
				     GP_MAX_MARKS, node->count);
	for (size_t i = 0; i < node->count; i++) {
		const struct gp_node *p = node->items[i];
		int64_t xy[2];
		if (!gp_node_expect_sequence(p, 2, diag) ||
		    !gp_node_length(p->items[0], diag, &xy[0]) ||
		    !gp_node_length(p->items[1], diag, &xy[1]))
			return false;
		m->at[i] = (struct gp_point){ xy[0], xy[1] };
	}
	m->count = node->count;
	return true;
}

static bool read_marks(struct gp_marks_spec *m, const struct gp_node *node,
		       struct gp_diag *diag)
{
	struct gp_reader r;
	m->where = node->where;
	if (node->kind == GP_NODE_SCALAR && strcmp(node->text, "none") == 0) {
		m->enabled = false;
		return true;
	}
	gp_reader_begin(&r, node, "'marks'", diag);
	gp_read_size(&r, "size", false, &m->size);
	gp_read_size(&r, "line", false, &m->line);
	gp_read_size(&r, "gap", false, &m->gap);
	const struct gp_node *at = gp_read_node(&r, "at", false);
	if (at)
		r.ok &= read_points(at, m, diag);
	if (r.ok && 3 * m->line >= m->size)
		return gp_diag_error(diag, &node->where,
				     "mark 'line' must be less than a third "
				     "of its 'size'");
	return gp_reader_end(&r);
}

static bool read_text(struct gp_text_spec *t, const struct gp_node *node,
		      struct gp_diag *diag)
{
	static const char *const plates[] = { "front", "back", NULL };
	struct gp_reader r;
	int plate = GP_PLATE_FRONT;
	int64_t at[2] = { 0, 0 };
	long rotation = 0;
	t->given = true;
	t->where = node->where;
	gp_reader_begin(&r, node, "'part_text'", diag);
	gp_read_choice(&r, "plate", false, plates, &plate);
	t->plate = (enum gp_plate)plate;
	gp_read_string(&r, "text", false, &t->text);
	gp_read_pair(&r, "position", true, at);
	gp_read_size(&r, "height", false, &t->height);
	gp_read_string(&r, "font", false, &t->font);
	gp_read_int(&r, "rotation", false, 0, 270, &rotation);
	gp_read_bool(&r, "mirror", false, &t->mirror);
	t->position = (struct gp_point){ at[0], at[1] };
	t->rotation = (int)rotation;
	if (rotation % 90)
		return gp_diag_error(diag, &node->where,
				     "'rotation' of the part text must be 0, "
				     "90, 180 or 270");
	return gp_reader_end(&r);
}

static struct gp_routing *routing_create(const struct gp_design *design)
{
	struct gp_routing *g = calloc(1, sizeof(*g));
	if (!g)
		return NULL;
	g->leads.width = DEFAULT_LEAD_WIDTH;
	if (g->leads.width < design->rules.min_line)
		g->leads.width = design->rules.min_line;
	g->leads.space = design->rules.min_space > DEFAULT_LEAD_WIDTH
				 ? design->rules.min_space
				 : DEFAULT_LEAD_WIDTH;
	g->leads.commons = GP_COMMONS_AUTO;
	g->seal.width = DEFAULT_SEAL_WIDTH;
	g->seal.distance = DEFAULT_SEAL_DISTANCE;
	g->seal.port_width = DEFAULT_PORT_WIDTH;
	g->seal.port_side = GP_SIDE_TOP;
	g->transfers.size = DEFAULT_TRANSFER_SIZE;
	g->transfers.count = 2;
	g->transfers.margin = design->rules.registration;
	g->marks.enabled = true;
	g->marks.size = DEFAULT_MARK_SIZE;
	g->marks.line = DEFAULT_MARK_LINE;
	g->marks.gap = DEFAULT_MARK_GAP;
	g->text.height = DEFAULT_TEXT_HEIGHT;
	g->text.font = "Liberation Sans";
	return g;
}

void gp_routing_destroy(struct gp_routing *routing)
{
	free(routing);
}

/* The seal's fill port goes opposite the first ledge unless told. */
static void default_port(struct gp_routing *g)
{
	if (g->ledge_count && !g->seal.port_side_given)
		g->seal.port_side = (g->ledges[0].side + 2) % GP_SIDE_COUNT;
}

bool gp_routing_read(struct gp_design *design, struct gp_reader *r,
		     struct gp_diag *diag)
{
	static const char *const keys[] = { "ledges", "leads", "seal",
					    "transfers", "marks", "pins",
					    "part_text" };
	const struct gp_node *nodes[7];
	bool any = false;
	for (size_t i = 0; i < 7; i++)
		any |= (nodes[i] = gp_read_node(r, keys[i], false)) != NULL;
	if (!any)
		return true;
	struct gp_routing *g = routing_create(design);
	if (!g)
		return gp_diag_oom(diag, NULL);
	design->routing = g;
	bool ok = true;
	if (nodes[0])
		ok &= read_ledges(design, g, nodes[0], diag);
	if (nodes[1])
		ok &= read_leads(design, &g->leads, nodes[1], diag);
	if (nodes[2])
		ok &= read_seal(&g->seal, nodes[2], diag);
	if (nodes[3])
		ok &= read_transfers(&g->transfers, nodes[3], diag);
	if (nodes[4])
		ok &= read_marks(&g->marks, nodes[4], diag);
	if (nodes[5]) {
		g->pins = nodes[5];
		ok &= gp_node_expect_map(nodes[5], diag);
	}
	if (nodes[6])
		ok &= read_text(&g->text, nodes[6], diag);
	for (size_t i = 1; ok && i < 7; i++) {
		if (!nodes[0] && nodes[i] && (i == 1 || i == 3 || i == 5))
			ok = gp_diag_error(diag, &nodes[i]->where,
					   "'%s' needs a 'ledges' section "
					   "to route to",
					   keys[i]);
	}
	if (!nodes[0] && !nodes[2] && ok) {
		/* marks and text without a seal have nothing to sit outside */
		const struct gp_node *n = nodes[4] ? nodes[4] : nodes[6];
		ok = gp_diag_error(diag, &n->where,
				   "'%s' needs a 'seal' section", nodes[4]
								  ? "marks"
								  : "part_text");
	}
	if (nodes[0] && !nodes[2])
		g->seal.given = true;   /* routing always has a seal */
	default_port(g);
	return ok;
}
