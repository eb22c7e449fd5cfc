/* Icons: reading the 'icons' section.  Each icon is text set in a font or
 * a shape, with its own (common, segment) pair.  The layout is in
 * icon-layout.c. */
#include "model.h"

#include "digits-spec.h"
#include "units.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const char *const shape_names[] = {
	"rectangle", "rounded_rectangle", "circle", "ring", "triangle",
	"arrow", "polygon", NULL,
};

static const char *const align_names[] = { "left", "centre", "right", NULL };
static const char *const vertical_names[] = { "baseline", "bottom", "middle",
					      "top", NULL };

/* Every key an icon may have; a key of another kind of icon is reported
 * as not applying rather than as unknown. */
static const char *const all_keys[] = {
	"text", "font", "cap_height", "em_size", "spacing", "align",
	"vertical", "kerning", "size", "radius", "diameter", "width",
	"shaft", "head", "points", NULL,
};

void gp_icons_free(struct gp_design *design)
{
	for (size_t i = 0; i < design->icon_count; i++) {
		free(design->icons[i].points);
		free(design->icons[i].made_name);
		free(design->icons[i].made_segment);
	}
	free(design->icons);
	design->icons = NULL;
	design->icon_count = 0;
}

static const char *kind_name(enum gp_icon_kind kind)
{
	return kind == GP_ICON_TEXT ? "text" : shape_names[kind - 1];
}

static bool read_rotation(struct gp_reader *r, struct gp_icon *icon)
{
	long rotation = 0;
	const struct gp_node *node = gp_read_node(r, "rotate", false);
	if (!node)
		return true;
	if (!gp_node_int(node, r->diag, 0, 270, &rotation))
		return r->ok = false;
	if (rotation % 90 != 0)
		return r->ok = gp_diag_fail(r->diag, GP_MSG_UNKNOWN_CHOICE,
					    &node->where,
					    "'rotate' must be 0, 90, 180 or "
					    "270 (degrees anticlockwise), got "
					    "%ld",
					    rotation);
	icon->rotation = (int)rotation;
	return true;
}

static bool read_text(struct gp_reader *r, struct gp_icon *icon,
		      const struct gp_node *text)
{
	struct gp_text_style *s = &icon->style;
	icon->kind = GP_ICON_TEXT;
	icon->text_where = text->where;
	bool ok = gp_read_string(r, "text", true, &icon->text);
	const struct gp_node *font = gp_read_node(r, "font", true);
	if (font) {
		icon->font_where = font->where;
		ok &= gp_read_string(r, "font", true, &icon->font);
	}
	const struct gp_node *cap = gp_read_node(r, "cap_height", false);
	const struct gp_node *em = gp_read_node(r, "em_size", false);
	if (cap && em)
		ok = gp_diag_fail(r->diag, GP_MSG_EXCLUSIVE_KEYS, &em->where,
				  "give either 'cap_height' or 'em_size' in "
				  "%s, not both",
				  r->what);
	else if (!cap && !em)
		ok = gp_diag_fail(r->diag, GP_MSG_MISSING_ONE_OF,
				  &r->map->where,
				  "missing required key 'cap_height' (or "
				  "'em_size') in %s",
				  r->what);
	else
		ok &= gp_read_size(r, cap ? "cap_height" : "em_size", true,
				   cap ? &s->cap_height : &s->em_size);
	ok &= gp_read_length(r, "spacing", false, &s->spacing);
	int align = GP_TEXT_LEFT, vertical = GP_TEXT_BASELINE;
	ok &= gp_read_choice(r, "align", false, align_names, &align);
	ok &= gp_read_choice(r, "vertical", false, vertical_names, &vertical);
	ok &= gp_read_bool(r, "kerning", false, &s->kerning);
	s->align = (enum gp_text_align)align;
	s->base = (enum gp_text_base)vertical;
	return ok;
}

static bool read_points(struct gp_reader *r, struct gp_icon *icon)
{
	const struct gp_node *node = gp_read_node(r, "points", true);
	if (!node)
		return false;
	if (node->kind != GP_NODE_SEQUENCE || node->count < 3 ||
	    node->count > GP_MAX_ICON_POINTS)
		return gp_diag_fail(r->diag, GP_MSG_WRONG_COUNT, &node->where,
				    "'points' must be a list of 3 to %d "
				    "corners [x, y] in millimetres",
				    GP_MAX_ICON_POINTS);
	icon->points = calloc(node->count, sizeof(*icon->points));
	if (!icon->points)
		return gp_diag_oom(r->diag, &node->where);
	for (size_t i = 0; i < node->count; i++) {
		const struct gp_node *p = node->items[i];
		int64_t x, y;
		if (p->kind != GP_NODE_SEQUENCE || p->count != 2)
			return gp_diag_fail(r->diag, GP_MSG_NOT_A_PAIR,
					    &p->where,
					    "each point must be a pair [x, y] "
					    "in millimetres");
		if (!gp_node_length(p->items[0], r->diag, &x) ||
		    !gp_node_length(p->items[1], r->diag, &y))
			return false;
		icon->points[i] = (struct gp_point){ x, y };
	}
	icon->point_count = node->count;
	return true;
}

/* Sizes that must agree with each other, per shape. */
static bool check_shape(struct gp_reader *r, const struct gp_icon *icon)
{
	char a[32], b[32];
	const struct gp_where *w = &r->map->where;
	int64_t small = icon->size[0] < icon->size[1] ? icon->size[0]
						      : icon->size[1];
	switch (icon->kind) {
	case GP_ICON_ROUNDED_RECTANGLE:
		if (2 * icon->radius > small) {
			gp_format_mm_short(a, sizeof(a), icon->radius);
			gp_format_mm_short(b, sizeof(b), small / 2);
			return gp_diag_fail(r->diag, GP_MSG_TOO_LARGE, w,
					    "%s: 'radius' %s mm is "
					    "more than half the smaller side "
					    "(%s mm)",
					    r->what, a, b);
		}
		break;
	case GP_ICON_RING:
		if (2 * icon->line >= icon->diameter)
			return gp_diag_fail(r->diag, GP_MSG_TOO_LARGE, w,
					    "%s: 'width' must be "
					    "less than half the 'diameter'",
					    r->what);
		break;
	case GP_ICON_ARROW:
		if (icon->line >= icon->size[1] || icon->head >= icon->size[0])
			return gp_diag_fail(r->diag, GP_MSG_TOO_LARGE, w,
					    "%s: the 'shaft' must "
					    "be narrower than the head width "
					    "(size[1]) and the 'head' shorter "
					    "than the length (size[0])",
					    r->what);
		break;
	default:
		break;
	}
	return true;
}

static bool read_shape(struct gp_reader *r, struct gp_icon *icon)
{
	int kind = 0;
	if (!gp_read_choice(r, "shape", true, shape_names, &kind))
		return false;
	icon->kind = (enum gp_icon_kind)(kind + 1);
	bool ok = true;
	switch (icon->kind) {
	case GP_ICON_ROUNDED_RECTANGLE:
		ok &= gp_read_size(r, "radius", true, &icon->radius);
		/* fall through */
	case GP_ICON_RECTANGLE:
	case GP_ICON_TRIANGLE:
		ok &= gp_read_size_pair(r, "size", true, icon->size);
		break;
	case GP_ICON_RING:
		ok &= gp_read_size(r, "width", true, &icon->line);
		/* fall through */
	case GP_ICON_CIRCLE:
		ok &= gp_read_size(r, "diameter", true, &icon->diameter);
		break;
	case GP_ICON_ARROW:
		ok &= gp_read_size_pair(r, "size", true, icon->size);
		icon->line = icon->size[1] / 3;
		icon->head = icon->size[1] / 2;
		ok &= gp_read_size(r, "shaft", false, &icon->line);
		ok &= gp_read_size(r, "head", false, &icon->head);
		break;
	case GP_ICON_POLYGON:
		ok &= read_points(r, icon);
		break;
	case GP_ICON_TEXT:
		break;
	}
	return ok && check_shape(r, icon);
}

/* Keys of another kind of icon: say they do not apply. */
static bool reject_other_keys(struct gp_reader *r, const struct gp_icon *icon)
{
	bool ok = true;
	for (size_t k = 0; r->map && k < r->map->count; k++) {
		const char *key = r->map->keys[k]->text;
		bool icon_key = false, asked = false;
		for (size_t i = 0; all_keys[i]; i++)
			icon_key |= strcmp(all_keys[i], key) == 0;
		for (size_t i = 0; i < r->known_count; i++)
			asked |= strcmp(r->known[i], key) == 0;
		if (!icon_key || asked)
			continue;
		ok = gp_diag_fail(r->diag, GP_MSG_KEY_DOES_NOT_APPLY,
				  &r->map->keys[k]->where,
				  "'%s' does not apply to a %s icon (%s)", key,
				  kind_name(icon->kind), r->what);
		gp_read_node(r, key, false);
	}
	return ok;
}

static int find_block(const struct gp_design *design, const char *name)
{
	for (size_t i = 0; i < design->block_count; i++)
		if (strcmp(design->blocks[i].name, name) == 0)
			return (int)i;
	return -1;
}

static int find_digits(const struct gp_design *design, const char *name)
{
	for (size_t i = 0; i < design->digit_count; i++)
		if (strcmp(design->digits[i].name, name) == 0)
			return (int)i;
	return -1;
}

static bool has_key(const struct gp_node *map, const char *key)
{
	for (size_t k = 0; map->kind == GP_NODE_MAP && k < map->count; k++)
		if (strcmp(map->keys[k]->text, key) == 0)
			return true;
	return false;
}

/* {digits: NAME, ...}: the row, or an error naming the rows there are. */
static bool digits_row(const struct gp_design *design, const char *name,
		       const struct gp_where *where, const char *what,
		       struct gp_diag *diag, int *row)
{
	*row = find_digits(design, name);
	if (*row >= 0)
		return true;
	const char *names[GP_DIGITS_MAX_ROWS];
	size_t n = 0;
	for (size_t i = 0; i < design->digit_count && n < GP_DIGITS_MAX_ROWS;
	     i++)
		names[n++] = design->digits[i].name;
	const char *near = n ? gp_nearest_word(name, names, n) : NULL;
	return gp_diag_fail(diag, GP_MSG_UNKNOWN_NAME, where,
			    "%s names digit row '%s', which is not described "
			    "in 'digits'%s%s%s",
			    what, name, near ? "; did you mean '" : "",
			    near ? near : "", near ? "'?" : "");
}

/* common: {digits: NAME, common: N}: common N (from 1) of a digit row. */
static bool read_digits_common(struct gp_icon *icon,
			       const struct gp_design *design,
			       const struct gp_node *node, const char *what,
			       struct gp_diag *diag)
{
	struct gp_reader r;
	const char *name = NULL;
	long index = 1;
	gp_reader_begin(&r, node, what, diag);
	bool ok = gp_read_string(&r, "digits", true, &name);
	ok &= gp_read_int(&r, "common", true, 1, 1000000, &index);
	if (!gp_reader_end(&r) || !ok)
		return false;
	int row;
	if (!digits_row(design, name, &node->where, what, diag, &row))
		return false;
	const struct gp_digits *d = &design->digits[row];
	if (index > d->duty)
		return gp_diag_fail(diag, GP_MSG_OUTSIDE_ELEMENT, &node->where,
				    "%s: digit row '%s' has %d common(s) (duty "
				    "1/%d); common %ld is outside",
				    what, name, d->duty, d->duty, index);
	icon->common_digits = row;
	icon->common_index = (int)index;
	return true;
}

/* common: NAME, auto, {block: NAME, line: N, row: N} to share the common
 * of a dot-matrix row (line and row count from 1; line defaults to 1), or
 * {digits: NAME, common: N} to share a digit row's. */
static bool read_common(struct gp_icon *icon, const struct gp_design *design,
			const struct gp_node *node, struct gp_diag *diag)
{
	icon->common_where = node->where;
	icon->common_block = -1;
	if (node->kind == GP_NODE_SCALAR) {
		if (!*node->text)
			return gp_diag_fail(diag, GP_MSG_EMPTY_VALUE,
					    &node->where,
					    "'common' is empty; expected a "
					    "name, {block, line, row} or "
					    "{digits, common}");
		icon->common = node->text;
		return true;
	}
	char what[160];
	snprintf(what, sizeof(what), "the common of icon '%s'", icon->name);
	if (has_key(node, "digits"))
		return read_digits_common(icon, design, node, what, diag);
	struct gp_reader r;
	const char *block = NULL;
	long line = 1, row = 1;
	gp_reader_begin(&r, node, what, diag);
	bool ok = gp_read_string(&r, "block", true, &block);
	ok &= gp_read_int(&r, "line", false, 1, 1000000, &line);
	ok &= gp_read_int(&r, "row", true, 1, 1000000, &row);
	if (!gp_reader_end(&r) || !ok)
		return false;
	int b = find_block(design, block);
	if (b < 0)
		return gp_diag_fail(diag, GP_MSG_UNKNOWN_NAME, &node->where,
				    "%s names block '%s', which is not "
				    "described in 'blocks'",
				    what, block);
	const struct gp_block *blk = &design->blocks[b];
	if (line > blk->lines || row > blk->dots_down)
		return gp_diag_fail(diag, GP_MSG_OUTSIDE_ELEMENT, &node->where,
				    "%s: block '%s' has %ld line(s) of %ld "
				    "dot rows; line %ld row %ld is outside",
				    what, block, blk->lines, blk->dots_down,
				    line, row);
	icon->common_block = b;
	icon->common_row = (line - 1) * blk->dots_down + (row - 1);
	return true;
}

/* segment: NAME, or {digits: NAME, digit: N, line: N} to share segment
 * line N of digit N (0: the sign unit) of a digit row.  Whether the line
 * exists is known once the row is planned (icon-layout.c). */
static bool read_segment(struct gp_icon *icon, const struct gp_design *design,
			 const struct gp_node *node, struct gp_diag *diag)
{
	icon->segment_where = node->where;
	if (node->kind == GP_NODE_SCALAR) {
		if (!*node->text)
			return gp_diag_fail(diag, GP_MSG_EMPTY_VALUE,
					    &node->where,
					    "'segment' is empty; expected a "
					    "name or {digits, digit, line}");
		icon->segment = node->text;
		return true;
	}
	char what[160];
	snprintf(what, sizeof(what), "the segment of icon '%s'", icon->name);
	struct gp_reader r;
	const char *name = NULL;
	long digit = 1, line = 1;
	gp_reader_begin(&r, node, what, diag);
	bool ok = gp_read_string(&r, "digits", true, &name);
	ok &= gp_read_int(&r, "digit", true, 0, 1000000, &digit);
	ok &= gp_read_int(&r, "line", true, 1, 1000000, &line);
	if (!gp_reader_end(&r) || !ok)
		return false;
	int row;
	if (!digits_row(design, name, &node->where, what, diag, &row))
		return false;
	const struct gp_digits *d = &design->digits[row];
	bool sign = d->minus || d->one;
	if (digit > d->count || (digit == 0 && !sign))
		return gp_diag_fail(diag, GP_MSG_OUTSIDE_ELEMENT, &node->where,
				    "%s: digit row '%s' has digits 1 to %ld%s; "
				    "digit %ld is outside",
				    what, name, d->count,
				    sign ? " and the sign unit 0" : "", digit);
	icon->segment_digits = row;
	icon->segment_digit = (int)digit;
	icon->segment_line = (int)line;
	return true;
}

/* slot: auto (instead of common and segment). */
static bool read_slot(struct gp_reader *r, struct gp_icon *icon)
{
	const struct gp_node *slot = gp_read_node(r, "slot", false);
	if (!slot)
		return true;
	icon->slot_where = slot->where;
	if (slot->kind != GP_NODE_SCALAR || strcmp(slot->text, "auto") != 0)
		return r->ok = gp_diag_fail(r->diag, GP_MSG_UNKNOWN_CHOICE,
					    &slot->where,
					    "'slot' of %s must be 'auto' (let "
					    "glassplot choose its common and "
					    "segment)",
					    r->what);
	icon->auto_slot = true;
	return true;
}

/* An array's cells may take their nets from lists, one per cell. */
struct array_spec {
	const struct gp_node *node;
	long count;
	int64_t pitch;            /* along a line */
	long direction;           /* degrees, along a line */
	bool arc;
	struct gp_point centre;   /* of the arc */
	double angle;             /* degrees between cells on the arc */
	bool turn;                /* cells turn with the arc */
	const struct gp_node *commons, *segments;
};

static bool read_nets(struct gp_reader *r, struct gp_icon *icon,
		      const struct gp_design *design, struct gp_diag *diag,
		      struct array_spec *a)
{
	if (!read_slot(r, icon))
		return false;
	bool given = icon->auto_slot;
	if (a->node) {
		a->commons = gp_read_node(r, "commons", false);
		a->segments = gp_read_node(r, "segments", false);
	}
	const struct gp_node *common =
		gp_read_node(r, "common", !given && !a->commons);
	const struct gp_node *segment =
		gp_read_node(r, "segment", !given && !a->segments);
	if ((common && a->commons) || (segment && a->segments))
		return gp_diag_fail(
			diag, GP_MSG_EXCLUSIVE_KEYS,
			common && a->commons ? &a->commons->where
					     : &a->segments->where,
			"give either '%s' or '%s' in %s, not both",
			common && a->commons ? "common" : "segment",
			common && a->commons ? "commons" : "segments", r->what);
	if (given && (a->commons || a->segments))
		return gp_diag_fail(diag, GP_MSG_EXCLUSIVE_KEYS,
				    &icon->slot_where,
				    "give either 'slot: auto' or the cells' "
				    "nets in %s, not both",
				    r->what);
	if (!given && !common && !segment && a->commons && a->segments)
		return true;
	if (!given && !common && a->commons)
		return segment && read_segment(icon, design, segment, diag);
	if (!given && !segment && a->segments)
		return common && read_common(icon, design, common, diag);
	if (given && (common || segment))
		return gp_diag_fail(diag, GP_MSG_EXCLUSIVE_KEYS,
				    common ? &common->where : &segment->where,
				    "give either 'slot: auto' or 'common' and "
				    "'segment' in %s, not both",
				    r->what);
	if (given)
		return true;
	bool ok = common && read_common(icon, design, common, diag);
	ok = segment && read_segment(icon, design, segment, diag) && ok;
	return ok;
}

/* array: {count, pitch, direction} along a line from position, or
 * {count, centre, angle, turn} along an arc through position. */
static bool read_array(struct gp_reader *parent, struct array_spec *a)
{
	char what[200];
	snprintf(what, sizeof(what), "'array' of %s", parent->what);
	struct gp_reader r;
	gp_reader_begin(&r, a->node, what, parent->diag);
	bool ok = gp_read_int(&r, "count", true, 2, GP_MAX_ICONS, &a->count);
	a->arc = gp_read_node(&r, "centre", false) != NULL;
	if (a->arc) {
		int64_t c[2] = { 0, 0 };
		ok &= gp_read_pair(&r, "centre", true, c);
		a->centre = (struct gp_point){ c[0], c[1] };
		ok &= gp_read_double(&r, "angle", true, -360, 360, &a->angle);
		a->turn = true;
		ok &= gp_read_bool(&r, "turn", false, &a->turn);
	} else {
		ok &= gp_read_length(&r, "pitch", true, &a->pitch);
		ok &= gp_read_int(&r, "direction", false, 0, 270, &a->direction);
		if (ok && a->direction % 90 != 0)
			ok = gp_diag_fail(
				parent->diag, GP_MSG_UNKNOWN_CHOICE,
				&a->node->where,
				"%s: 'direction' must be 0, 90, 180 "
				"or 270 (degrees anticlockwise from "
				"+x); use 'centre' and 'angle' for an "
				"arc",
				what);
	}
	return gp_reader_end(&r) && ok;
}

static bool read_icon(struct gp_icon *icon, const struct gp_design *design,
		      const char *name, const struct gp_node *node,
		      struct gp_diag *diag, struct array_spec *array)
{
	char what[160];
	snprintf(what, sizeof(what), "icon '%s'", name);
	struct gp_reader r;
	int64_t position[2] = { 0, 0 };
	memset(icon, 0, sizeof(*icon));
	icon->name = name;
	icon->where = node->where;
	icon->common_block = -1;
	icon->common_digits = -1;
	icon->segment_digits = -1;
	gp_text_style_init(&icon->style);
	icon->style.chord_tolerance = design->rules.chord_tolerance;
	gp_reader_begin(&r, node, what, diag);
	if (!r.map)
		return gp_reader_end(&r);
	bool ok = gp_read_pair(&r, "position", true, position);
	icon->position = (struct gp_point){ position[0], position[1] };
	ok &= read_rotation(&r, icon);
	ok &= gp_read_bool(&r, "mirror", false, &icon->mirror);
	memset(array, 0, sizeof(*array));
	array->node = gp_read_node(&r, "array", false);
	if (array->node)
		ok = read_array(&r, array) && ok;
	ok = read_nets(&r, icon, design, diag, array) && ok;
	const struct gp_node *text = gp_read_node(&r, "text", false);
	const struct gp_node *shape = gp_read_node(&r, "shape", false);
	if (text && shape) {
		ok = gp_diag_fail(diag, GP_MSG_EXCLUSIVE_KEYS, &shape->where,
				  "give either 'text' or "
				  "'shape' in %s, not both",
				  what);
	} else if (!text && !shape) {
		ok = gp_diag_fail(diag, GP_MSG_MISSING_ONE_OF, &node->where,
				  "missing 'text' or "
				  "'shape' in %s",
				  what);
	} else {
		ok = (text ? read_text(&r, icon, text)
			   : read_shape(&r, icon)) && ok;
		ok = reject_other_keys(&r, icon) && ok;
	}
	icon->style.rotation = icon->rotation;
	icon->style.mirror = icon->mirror;
	return gp_reader_end(&r) && ok;
}

static bool same_common(const struct gp_icon *a, const struct gp_icon *b)
{
	if (a->common || b->common)
		return a->common && b->common &&
		       strcmp(a->common, b->common) == 0;
	if (a->common_digits >= 0 || b->common_digits >= 0)
		return a->common_digits == b->common_digits &&
		       a->common_index == b->common_index;
	return a->common_block == b->common_block &&
	       a->common_row == b->common_row;
}

static bool same_segment(const struct gp_icon *a, const struct gp_icon *b)
{
	if (a->segment || b->segment)
		return a->segment && b->segment &&
		       strcmp(a->segment, b->segment) == 0;
	return a->segment_digits == b->segment_digits &&
	       a->segment_digit == b->segment_digit &&
	       a->segment_line == b->segment_line;
}

static void describe_common(const struct gp_design *design,
			    const struct gp_icon *icon, char *out, size_t size)
{
	if (icon->common) {
		snprintf(out, size, "common '%s'", icon->common);
		return;
	}
	if (icon->common_digits >= 0) {
		snprintf(out, size, "common %d of digit row '%s'",
			 icon->common_index,
			 design->digits[icon->common_digits].name);
		return;
	}
	const struct gp_block *b = &design->blocks[icon->common_block];
	snprintf(out, size, "the common of block '%s' line %ld row %ld",
		 b->name, icon->common_row / b->dots_down + 1,
		 icon->common_row % b->dots_down + 1);
}

static void describe_segment(const struct gp_design *design,
			     const struct gp_icon *icon, char *out, size_t size)
{
	if (icon->segment)
		snprintf(out, size, "segment '%s'", icon->segment);
	else
		snprintf(out, size, "line %d of digit %d of row '%s'",
			 icon->segment_line, icon->segment_digit,
			 design->digits[icon->segment_digits].name);
}

/* Each icon lights where its common and segment cross; two icons with the
 * same pair would always light together. */
static bool check_pairs(const struct gp_design *design, struct gp_diag *diag)
{
	bool ok = true;
	for (size_t i = 0; i < design->icon_count; i++) {
		const struct gp_icon *b = &design->icons[i];
		for (size_t j = 0; j < i; j++) {
			const struct gp_icon *a = &design->icons[j];
			if (a->auto_slot || b->auto_slot ||
			    !same_segment(a, b) || !same_common(a, b))
				continue;
			char common[160], segment[160];
			describe_common(design, b, common, sizeof(common));
			describe_segment(design, b, segment, sizeof(segment));
			ok = gp_diag_fail(diag, GP_MSG_PAIR_TAKEN,
					  &b->common_where,
					  "icons '%s' (line %d) and '%s' both "
					  "use %s with %s; each icon needs its "
					  "own (common, segment) pair",
					  a->name, a->where.line, b->name,
					  common, segment);
			break;
		}
	}
	return ok;
}

/* Text is the costly kind of icon (each glyph is shaped, flattened and
 * checked): its total is bounded too. */
static bool check_text_total(const struct gp_design *design,
			     const struct gp_node *node, struct gp_diag *diag)
{
	size_t total = 0;
	for (size_t i = 0; i < design->icon_count; i++)
		if (design->icons[i].kind == GP_ICON_TEXT)
			total += strlen(design->icons[i].text);
	if (total <= GP_MAX_ICON_TEXT)
		return true;
	return gp_diag_fail(diag, GP_MSG_OVER_LIMIT, &node->where,
			    "the icons have %zu bytes of text in all; the "
			    "limit is %d",
			    total, GP_MAX_ICON_TEXT);
}

static char *join_name(const char *base, long k)
{
	size_t n = strlen(base) + 24;
	char *out = malloc(n);
	if (out)
		snprintf(out, n, "%s%ld", base, k);
	return out;
}

/* Cell k (from 0) of an array: the span is the datum, so its place is
 * computed from the first cell directly (position + k x pitch along a
 * line; on an arc, the first cell's angle + k x angle). */
static void place_cell(const struct gp_icon *first, const struct array_spec *a,
		       long k, struct gp_icon *cell)
{
	if (!a->arc) {
		int64_t d = (int64_t)k * a->pitch;
		static const int dx[] = { 1, 0, -1, 0 }, dy[] = { 0, 1, 0, -1 };
		int q = (int)(a->direction / 90);
		cell->position = (struct gp_point){ first->position.x + dx[q] * d,
						    first->position.y + dy[q] * d };
		return;
	}
	double x = (double)(first->position.x - a->centre.x);
	double y = (double)(first->position.y - a->centre.y);
	double radius = sqrt(x * x + y * y);
	double t = atan2(y, x) + (double)k * a->angle * 3.14159265358979323846 /
					 180;
	cell->position = (struct gp_point){ a->centre.x + llround(radius * cos(t)),
					    a->centre.y + llround(radius * sin(t)) };
	cell->turn = a->turn ? (double)k * a->angle : 0;
}

static bool list_item(const struct gp_node *list, long count, long k,
		      const char *key, const char *what, struct gp_diag *diag,
		      const char **out)
{
	if (list->kind != GP_NODE_SEQUENCE || (long)list->count != count)
		return gp_diag_fail(diag, GP_MSG_WRONG_COUNT, &list->where,
				    "'%s' of %s must list one name for each "
				    "of its %ld cells",
				    key, what, count);
	const struct gp_node *item = list->items[k];
	if (item->kind != GP_NODE_SCALAR || !*item->text)
		return gp_diag_fail(diag, GP_MSG_WRONG_KIND, &item->where,
				    "each of the '%s' of %s must be a name",
				    key, what);
	*out = item->text;
	return true;
}

/* Copies of icon as the cells of its array, appended at *count. */
static bool expand(struct gp_design *design, size_t at,
		   const struct array_spec *a, struct gp_diag *diag)
{
	struct gp_icon first = design->icons[at];
	char what[160];
	snprintf(what, sizeof(what), "icon '%s'", first.name);
	if (a->arc && a->turn && first.kind == GP_ICON_TEXT)
		return gp_diag_fail(diag, GP_MSG_KEY_DOES_NOT_APPLY,
				    &a->node->where,
				    "%s: text does not turn along an arc; "
				    "give the array 'turn: false'",
				    what);
	bool ok = true;
	for (long k = 0; ok && k < a->count; k++) {
		struct gp_icon *cell = &design->icons[at + (size_t)k];
		*cell = first;
		cell->points = NULL;
		cell->made_name = cell->made_segment = NULL;
		cell->cell = k + 1;
		design->icon_count = at + (size_t)k + 1;
		if (first.point_count) {
			cell->points = malloc(first.point_count *
					      sizeof(*cell->points));
			if (!cell->points)
				return gp_diag_oom(diag, &a->node->where);
			memcpy(cell->points, first.points,
			       first.point_count * sizeof(*cell->points));
		}
		cell->made_name = join_name(first.name, k + 1);
		if (!cell->made_name)
			return gp_diag_oom(diag, &a->node->where);
		cell->name = cell->made_name;
		place_cell(&first, a, k, cell);
		if (a->commons) {
			cell->common_block = cell->common_digits = -1;
			ok = list_item(a->commons, a->count, k, "commons", what,
				       diag, &cell->common);
			cell->common_where = a->commons->where;
		}
		if (a->segments) {
			cell->segment_digits = -1;
			ok = ok && list_item(a->segments, a->count, k,
					     "segments", what, diag,
					     &cell->segment);
			cell->segment_where = a->segments->where;
		} else if (!first.auto_slot && first.segment && !a->commons) {
			/* one common: each cell a segment line of its own */
			cell->made_segment = join_name(first.segment, k + 1);
			if (!cell->made_segment)
				return gp_diag_oom(diag, &a->node->where);
			cell->segment = cell->made_segment;
		} else if (!first.auto_slot && !a->commons &&
			   first.segment_digits >= 0) {
			ok = gp_diag_fail(diag, GP_MSG_MISSING_ONE_OF,
					  &first.segment_where,
					  "%s: the cells of an array need a "
					  "segment each; give 'segments' or "
					  "'commons' as lists, or 'slot: auto'",
					  what);
		}
	}
	free(first.points);
	return ok;
}

static bool unique_names(const struct gp_design *design, struct gp_diag *diag)
{
	for (size_t i = 0; i < design->icon_count; i++)
		for (size_t j = 0; j < i; j++)
			if (strcmp(design->icons[i].name,
				   design->icons[j].name) == 0)
				return gp_diag_fail(
					diag, GP_MSG_DUPLICATE_NAME,
					&design->icons[i].where,
					"icon name '%s' is used twice (a cell "
					"of an array is named after it and its "
					"number)",
					design->icons[i].name);
	return true;
}

bool gp_icons_read(struct gp_design *design, const struct gp_node *node,
		   struct gp_diag *diag)
{
	if (!gp_node_expect_map(node, diag))
		return false;
	if (node->count > GP_MAX_ICONS)
		return gp_diag_fail(diag, GP_MSG_OVER_LIMIT, &node->where,
				    "%zu icons; the limit is %d", node->count,
				    GP_MAX_ICONS);
	size_t capacity = node->count ? node->count : 1;
	design->icons = calloc(capacity, sizeof(*design->icons));
	if (!design->icons)
		return gp_diag_oom(diag, &node->where);
	bool ok = true, arrays = false;
	for (size_t i = 0; i < node->count; i++) {
		struct array_spec a;
		size_t at = design->icon_count;
		/* counted before reading, so that a failed icon's points
		 * are freed too */
		design->icon_count = at + 1;
		bool read = read_icon(&design->icons[at], design,
				      node->keys[i]->text, node->items[i], diag,
				      &a);
		ok &= read;
		if (!read || !a.node)
			continue;
		arrays = true;
		size_t need = at + (size_t)a.count + (node->count - i - 1);
		if (need > GP_MAX_ICONS)
			return gp_diag_fail(diag, GP_MSG_OVER_LIMIT,
					    &a.node->where,
					    "%zu icons with the cells of the "
					    "arrays; the limit is %d",
					    need, GP_MAX_ICONS);
		if (need > capacity) {
			struct gp_icon *grown = realloc(design->icons,
							need * sizeof(*grown));
			if (!grown)
				return gp_diag_oom(diag, &node->where);
			memset(grown + capacity, 0,
			       (need - capacity) * sizeof(*grown));
			design->icons = grown;
			capacity = need;
		}
		ok &= expand(design, at, &a, diag);
	}
	return ok && (!arrays || unique_names(design, diag)) &&
	       check_text_total(design, node, diag) &&
	       check_pairs(design, diag);
}
