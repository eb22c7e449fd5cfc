/* Icon layout: the front electrode of each icon (text through the font
 * module, shapes through icon-geom.c), checked against the minimum line
 * width and space; thin front bridges joining its parts; back patches per
 * common (patch.h) notched around front traces, joined by back bridges
 * that keep clear of the front; one intended pixel per icon; summary
 * lines. */
#include "layout.h"
#include "digits.h"
#include "font.h"
#include "icons.h"
#include "patch.h"
#include "units.h"

#include "array.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* At most this many width or space findings are reported per icon. */
#define MAX_FINDINGS 3

struct icon_work {
	struct gp_polyset front;    /* electrode */
	struct gp_polyset bridges;  /* front bridges */
	struct gp_polyset back_bridges;
	int common, segment;        /* net indices */
	bool own_common, own_segment;  /* nets the icons made */
	int slot_row, slot_digit;   /* spare slot taken (slot: auto), row -1 */
	size_t group;               /* patch group (one per common) */
};

struct slot;

struct font_entry {
	const char *name;
	struct gp_font *font;
};

struct layout {
	struct gp_build *build;
	const struct gp_design *design;
	struct gp_diag *diag;
	struct gp_geos *geos;
	struct font_entry *fonts;
	size_t font_count;
	char *base_dir;
	struct icon_work *icons;
	/* patch groups: one per distinct common net */
	int *group_net;
	size_t group_count;
	struct gp_polyset *patches;
	enum gp_plate front_plate, back_plate;
	int first_icon_net;         /* nets before it are the blocks' and
				     * digits' */
	uint64_t *pairs;            /* (common, segment) of their pixels,
				     * sorted */
	size_t pair_count;
	struct slot *slots;         /* spare slots of the digit rows */
	size_t slot_count, slot_capacity;
};

static void fmt(char *buf, size_t size, int64_t nm)
{
	gp_format_mm_short(buf, size, nm);
}

/* --- fonts ---------------------------------------------------------------- */

static char *directory_of(const char *file)
{
	const char *slash = file ? strrchr(file, '/') : NULL;
	if (!slash)
		return NULL;
	size_t n = (size_t)(slash - file);
	char *dir = malloc(n + 1);
	if (dir) {
		memcpy(dir, file, n);
		dir[n] = '\0';
	}
	return dir;
}

static struct gp_font *font_for(struct layout *l, const struct gp_icon *icon)
{
	for (size_t i = 0; i < l->font_count; i++)
		if (strcmp(l->fonts[i].name, icon->font) == 0)
			return l->fonts[i].font;
	struct gp_font *font = gp_font_open(icon->font, l->base_dir,
					    &icon->font_where, l->diag);
	if (!font)
		return NULL;
	struct font_entry *fonts = realloc(l->fonts, (l->font_count + 1) *
						     sizeof(*fonts));
	if (!fonts) {
		gp_font_destroy(font);
		gp_diag_oom(l->diag, NULL);
		return NULL;
	}
	l->fonts = fonts;
	l->fonts[l->font_count++] = (struct font_entry){ icon->font, font };
	return font;
}

static void note_font(struct layout *l, const struct gp_icon *icon,
		      const struct gp_font *font, const struct gp_text *text)
{
	char size[32], em[32];
	fmt(size, sizeof(size), icon->style.cap_height ? icon->style.cap_height
						       : icon->style.em_size);
	fmt(em, sizeof(em), text->em_size);
	gp_buffer_printf(&l->build->notes,
			 "icon %s: '%s' in %s %s (%s, face %ld), %s %s mm, "
			 "em %s mm\n",
			 icon->name, icon->text, gp_font_family(font),
			 gp_font_style(font), gp_font_file(font),
			 gp_font_face_index(font),
			 icon->style.cap_height ? "cap height" : "em size",
			 size, em);
}

/* --- front electrodes ------------------------------------------------------ */

static bool make_text(struct layout *l, const struct gp_icon *icon,
		      struct gp_polyset *out)
{
	struct gp_font *font = font_for(l, icon);
	if (!font)
		return false;
	struct gp_text text;
	if (!gp_font_set_text(font, icon->text, &icon->style, icon->position,
			      &text, &icon->text_where, l->diag))
		return false;
	bool ok = gp_text_polygons(l->geos, &text, out);
	if (ok)
		note_font(l, icon, font, &text);
	gp_text_finish(&text);
	return ok;
}

static void where_mm(char *buf, size_t size, struct gp_point p)
{
	char x[32], y[32];
	fmt(x, sizeof(x), p.x);
	fmt(y, sizeof(y), p.y);
	snprintf(buf, size, "(%s, %s)", x, y);
}

static int64_t max64i(int64_t a, int64_t b) { return a > b ? a : b; }
static int64_t min64i(int64_t a, int64_t b) { return a < b ? a : b; }

static bool report_thin(struct layout *l, const struct gp_icon *icon,
			const struct gp_polyset *thin)
{
	char at[80], near[80], w[32];
	where_mm(at, sizeof(at), icon->position);
	fmt(w, sizeof(w), l->design->rules.min_line);
	for (size_t i = 0; i < thin->count && i < MAX_FINDINGS; i++) {
		/* a corner of the thin piece: on the stroke itself, where
		 * the middle of its box may not be */
		where_mm(near, sizeof(near), thin->items[i].outer.points[0]);
		gp_diag_error(l->diag, &icon->where,
			      "icon '%s' at %s mm: a stroke near %s mm is "
			      "thinner than min_line %s mm; make the icon "
			      "larger or use a bolder font", icon->name, at,
			      near, w);
	}
	return thin->count == 0;
}

static bool report_close(struct layout *l, const struct gp_icon *icon,
			 struct gp_point near_point, double distance,
			 bool inside)
{
	char at[80], near[80], s[32], d[32];
	where_mm(at, sizeof(at), icon->position);
	where_mm(near, sizeof(near), near_point);
	fmt(s, sizeof(s), l->design->rules.min_space);
	if (inside)
		return gp_diag_error(l->diag, &icon->where,
				     "icon '%s' at %s mm: a gap near %s mm is "
				     "narrower than min_space %s mm; make the "
				     "icon larger", icon->name, at, near, s);
	fmt(d, sizeof(d), (int64_t)(distance + 0.5));
	return gp_diag_error(l->diag, &icon->where,
			     "icon '%s' at %s mm: letters %s mm apart near %s "
			     "mm, closer than min_space %s mm; add 'spacing' "
			     "or make the icon larger", icon->name, at, d, near,
			     s);
}

/* Parts of the electrode closer than the minimum space: separate parts
 * (letters) by their distance, gaps inside one part by a closing. */
static bool check_space(struct layout *l, const struct gp_icon *icon,
			const struct gp_polyset *front, int *findings)
{
	int64_t space = l->design->rules.min_space;
	struct gp_index_pair *pairs = NULL;
	size_t pair_count = 0;
	struct gp_box *boxes = calloc(front->count ? front->count : 1,
				      sizeof(*boxes));
	if (!boxes)
		return gp_diag_oom(l->diag, NULL);
	for (size_t i = 0; i < front->count; i++)
		boxes[i] = gp_polygon_bounds(&front->items[i]);
	bool ok = gp_geos_box_pairs(l->geos, boxes, front->count, space,
				    &pairs, &pair_count);
	for (size_t k = 0; ok && k < pair_count; k++) {
		struct gp_geos_shape *a = gp_geos_shape_from_polygon(
			l->geos, &front->items[pairs[k].a]);
		struct gp_geos_shape *b = gp_geos_shape_from_polygon(
			l->geos, &front->items[pairs[k].b]);
		double d = 0;
		struct gp_point pa, pb;
		ok = a && b && gp_geos_shape_distance(l->geos, a, b, &d) &&
		     gp_geos_shape_nearest(l->geos, a, b, &pa, &pb);
		if (ok && d < (double)space && (*findings)++ < MAX_FINDINGS)
			report_close(l, icon,
				     (struct gp_point){ (pa.x + pb.x) / 2,
							(pa.y + pb.y) / 2 },
				     d, false);
		gp_geos_shape_destroy(l->geos, a);
		gp_geos_shape_destroy(l->geos, b);
	}
	free(pairs);
	free(boxes);
	for (size_t i = 0; ok && i < front->count; i++) {
		struct gp_polyset gaps;
		gp_polyset_init(&gaps);
		ok = gp_narrow_gaps(l->geos, &front->items[i], space, &gaps);
		for (size_t g = 0; ok && g < gaps.count; g++)
			if ((*findings)++ < MAX_FINDINGS)
				report_close(l, icon,
					     gp_box_centre(gp_polygon_bounds(
						     &gaps.items[g])),
					     0, true);
		gp_polyset_finish(&gaps);
	}
	return ok;
}

/* The electrode of one icon, checked.  False on any error. */
static bool make_front(struct layout *l, const struct gp_icon *icon,
		       struct gp_polyset *out)
{
	size_t errors = l->diag->errors;
	bool ok = icon->kind == GP_ICON_TEXT
			  ? make_text(l, icon, out)
			  : gp_icon_shape(l->geos, icon,
					  l->design->rules.chord_tolerance,
					  out);
	if (!ok)
		return false;
	if (out->count == 0)
		return gp_diag_error(l->diag, &icon->where,
				     "icon '%s' has no area; check its size "
				     "and points", icon->name);
	struct gp_polyset thin;
	gp_polyset_init(&thin);
	ok = gp_thin_parts(l->geos, out, l->design->rules.min_line, &thin);
	if (ok)
		report_thin(l, icon, &thin);
	gp_polyset_finish(&thin);
	int findings = 0;
	ok = ok && check_space(l, icon, out, &findings);
	return ok && l->diag->errors == errors;
}

/* --- nets ----------------------------------------------------------------- */

/* Icon commons and segments are numbered in order of first use.  A name
 * COMn or SEGn that a block or digit row made is that net; a digit row's
 * common or a digit's segment line is that row's net; an icon with
 * 'slot: auto' takes a spare slot (assign_slots). */

/* A net the blocks and digit rows made, by name, or -1. */
static int earlier_net(const struct layout *l, const char *name,
		       enum gp_net_kind kind)
{
	const struct gp_artwork *art = &l->build->art;
	for (int i = 0; i < l->first_icon_net; i++)
		if (art->nets[i].kind == kind &&
		    strcmp(art->nets[i].name, name) == 0)
			return i;
	return -1;
}

/* Names of the form COMn / SEGn name the glass's own nets. */
static bool net_like(const char *name, const char *prefix)
{
	size_t n = strlen(prefix);
	if (strncmp(name, prefix, n) != 0 || name[n] < '1' || name[n] > '9')
		return false;
	for (const char *c = name + n; *c; c++)
		if (*c < '0' || *c > '9')
			return false;
	return true;
}

static bool no_such_net(struct layout *l, const struct gp_icon *icon,
			const struct gp_where *where, const char *name,
			enum gp_net_kind kind)
{
	int count = 0;
	for (int i = 0; i < l->first_icon_net; i++)
		count += l->build->art.nets[i].kind == kind;
	bool common = kind == GP_NET_COMMON;
	char have[64];
	if (count)
		snprintf(have, sizeof(have), "the blocks and digit rows make "
			 "%s1 to %s%d", common ? "COM" : "SEG",
			 common ? "COM" : "SEG", count);
	else
		snprintf(have, sizeof(have), "the blocks and digit rows make "
			 "no %s", common ? "commons" : "segments");
	return gp_diag_error(l->diag, where,
			     "icon '%s': %s '%s' is not a net of the glass "
			     "(%s); give an icon %s another name%s",
			     icon->name, common ? "common" : "segment", name,
			     have, common ? "common" : "segment",
			     common ? ", or use {block, line, row} or "
				      "{digits, common}"
				    : ", or use {digits, digit, line}");
}

static const struct gp_digit_unit *find_unit(const struct gp_digit_row *row,
					     int number)
{
	for (size_t u = 0; u < row->unit_count; u++)
		if (row->units[u].number == number)
			return &row->units[u];
	return NULL;
}

static int icon_common(struct layout *l, size_t i)
{
	const struct gp_design *d = l->design;
	const struct gp_icon *icon = &d->icons[i];
	if (icon->common_digits >= 0) {
		if ((size_t)icon->common_digits >= l->build->digit_row_count)
			return -1;
		return l->build->digit_rows[icon->common_digits].first_common +
		       icon->common_index - 1;
	}
	if (!icon->common)
		return gp_block_common_net(l->build, (size_t)icon->common_block,
					   icon->common_row);
	if (net_like(icon->common, "COM")) {
		int net = earlier_net(l, icon->common, GP_NET_COMMON);
		if (net < 0)
			no_such_net(l, icon, &icon->common_where, icon->common,
				    GP_NET_COMMON);
		return net;
	}
	for (size_t j = 0; j < i; j++)
		if (d->icons[j].common &&
		    strcmp(icon->common, d->icons[j].common) == 0)
			return l->icons[j].common;
	l->icons[i].own_common = true;
	return gp_artwork_add_net(&l->build->art, GP_NET_COMMON, l->back_plate);
}

static int icon_segment(struct layout *l, size_t i)
{
	const struct gp_design *d = l->design;
	const struct gp_icon *icon = &d->icons[i];
	if (icon->segment_digits >= 0) {
		const struct gp_digit_row *row =
			(size_t)icon->segment_digits < l->build->digit_row_count
				? &l->build->digit_rows[icon->segment_digits]
				: NULL;
		const struct gp_digit_unit *u =
			row ? find_unit(row, icon->segment_digit) : NULL;
		if (!u)
			return -1;
		if (icon->segment_line > u->line_count) {
			gp_diag_error(l->diag, &icon->segment_where,
				      "icon '%s': digit %d of row '%s' has %d "
				      "segment line(s); line %d is outside",
				      icon->name, icon->segment_digit,
				      d->digits[icon->segment_digits].name,
				      u->line_count, icon->segment_line);
			return -1;
		}
		return u->first_line_net + icon->segment_line - 1;
	}
	if (net_like(icon->segment, "SEG")) {
		int net = earlier_net(l, icon->segment, GP_NET_SEGMENT);
		if (net < 0)
			no_such_net(l, icon, &icon->segment_where,
				    icon->segment, GP_NET_SEGMENT);
		return net;
	}
	for (size_t j = 0; j < i; j++)
		if (d->icons[j].segment &&
		    strcmp(icon->segment, d->icons[j].segment) == 0)
			return l->icons[j].segment;
	l->icons[i].own_segment = true;
	return gp_artwork_add_net(&l->build->art, GP_NET_SEGMENT,
				  l->front_plate);
}

/* --- slots --------------------------------------------------------------- */

/* What already lights at (common, segment): a digit part, a dot or an
 * icon placed before icon `upto`; its name into what.  Pixels of the
 * blocks and digits are searched in a sorted table of their pairs. */
static uint64_t pair_key(int common, int segment)
{
	return (uint64_t)(uint32_t)common << 32 | (uint32_t)segment;
}

static int compare_keys(const void *a, const void *b)
{
	uint64_t x = *(const uint64_t *)a, y = *(const uint64_t *)b;
	return (x > y) - (x < y);
}

static bool make_pair_table(struct layout *l)
{
	const struct gp_artwork *art = &l->build->art;
	l->pairs = malloc((art->pixel_count ? art->pixel_count : 1) *
			  sizeof(*l->pairs));
	if (!l->pairs)
		return gp_diag_oom(l->diag, NULL);
	for (size_t k = 0; k < art->pixel_count; k++)
		l->pairs[k] = pair_key(art->pixels[k].common,
				       art->pixels[k].segment);
	l->pair_count = art->pixel_count;
	qsort(l->pairs, l->pair_count, sizeof(*l->pairs), compare_keys);
	return true;
}

static bool taken(const struct layout *l, size_t upto, int common, int segment,
		  char *what, size_t size)
{
	uint64_t key = pair_key(common, segment);
	if (bsearch(&key, l->pairs, l->pair_count, sizeof(*l->pairs),
		    compare_keys)) {
		const struct gp_artwork *art = &l->build->art;
		for (size_t k = 0; k < art->pixel_count; k++) {
			const struct gp_pixel *px = &art->pixels[k];
			if (px->common != common || px->segment != segment)
				continue;
			if (px->owner_kind == GP_OWNER_DIGITS)
				gp_digits_pixel_label(l->build, px, what, size);
			else
				snprintf(what, size, "a dot of a block");
			return true;
		}
	}
	for (size_t j = 0; j < upto; j++)
		if (l->icons[j].common == common &&
		    l->icons[j].segment == segment) {
			snprintf(what, size, "icon '%s'",
				 l->design->icons[j].name);
			return true;
		}
	return false;
}

/* A spare (common, segment line) slot of a digit unit. */
struct slot {
	int common, segment;
	int row, digit;           /* row index, unit number */
	struct gp_point centre;   /* of the unit */
	bool used;
};

static bool add_slot(struct layout *l, struct slot s)
{
	if (!gp_array_reserve(l->slots, l->slot_capacity, l->slot_count + 1))
		return gp_diag_oom(l->diag, NULL);
	l->slots[l->slot_count++] = s;
	return true;
}

/* Every spare slot of every digit row, row by row, digit by digit, common
 * by common: slots no part of the unit uses (duty x lines > parts). */
static bool find_slots(struct layout *l)
{
	const struct gp_design *d = l->design;
	for (size_t r = 0; r < l->build->digit_row_count; r++) {
		const struct gp_digit_row *row = &l->build->digit_rows[r];
		const struct gp_figure_spec *f = &d->digits[r].figure;
		for (size_t u = 0; u < row->unit_count; u++) {
			const struct gp_digit_unit *unit = &row->units[u];
			struct gp_point c = { unit->origin.x + f->width / 2,
					      unit->origin.y + f->height / 2 };
			for (int com = 1; com <= row->common_count; com++)
				for (int line = 1; line <= unit->line_count;
				     line++) {
					bool used = false;
					for (int p = 0; p < unit->part_count; p++)
						used |= unit->parts[p].common == com &&
							unit->parts[p].line == line;
					if (!used && !add_slot(l, (struct slot){
						    row->first_common + com - 1,
						    unit->first_line_net + line - 1,
						    (int)r, unit->number, c, false }))
						return false;
				}
		}
	}
	return true;
}

static double distance2(struct gp_point a, struct gp_point b)
{
	double dx = (double)(a.x - b.x), dy = (double)(a.y - b.y);
	return dx * dx + dy * dy;
}

/* An icon with 'slot: auto' takes the free spare slot of the digit unit
 * nearest to it; when every spare slot is taken, the common of the
 * nearest digit row's band nearest to it (or the first named icon
 * common) with a segment line of its own. */
static bool assign_slot(struct layout *l, size_t i)
{
	const struct gp_icon *icon = &l->design->icons[i];
	struct icon_work *w = &l->icons[i];
	char what[160];
	int best = -1;
	double best_d = 0;
	for (size_t k = 0; k < l->slot_count; k++) {
		struct slot *s = &l->slots[k];
		if (s->used || taken(l, l->design->icon_count, s->common,
				     s->segment, what, sizeof(what)))
			continue;
		double dd = distance2(icon->position, s->centre);
		if (best < 0 || dd < best_d)
			best = (int)k, best_d = dd;
	}
	if (best >= 0) {
		struct slot *s = &l->slots[best];
		s->used = true;
		w->common = s->common;
		w->segment = s->segment;
		w->slot_row = s->row;
		w->slot_digit = s->digit;
		return true;
	}
	w->common = -1;
	const struct gp_design *d = l->design;
	double near = 0;
	for (size_t r = 0; r < l->build->digit_row_count; r++) {
		const struct gp_digit_row *row = &l->build->digit_rows[r];
		const struct gp_digits *dr = &d->digits[r];
		for (int com = 0; com < row->common_count; com++) {
			/* bands top down: common 1 at the top */
			struct gp_point c = {
				dr->origin.x + (dr->count * dr->pitch) / 2,
				dr->origin.y + dr->figure.height -
					(2 * com + 1) * dr->figure.height /
						(2 * row->common_count) };
			double dd = distance2(icon->position, c);
			if (w->common < 0 || dd < near)
				w->common = row->first_common + com,
				near = dd;
		}
	}
	for (size_t j = 0; w->common < 0 && j < d->icon_count; j++)
		if (!d->icons[j].auto_slot && l->icons[j].own_common)
			w->common = l->icons[j].common;
	if (w->common < 0)
		return gp_diag_error(l->diag, &icon->slot_where,
				     "icon '%s' has 'slot: auto' but the glass "
				     "has no digit row with a spare slot and "
				     "no icon common to share; give it "
				     "'common' and 'segment'", icon->name);
	w->segment = gp_artwork_add_net(&l->build->art, GP_NET_SEGMENT,
					l->front_plate);
	w->own_segment = true;
	return w->segment >= 0 || gp_diag_oom(l->diag, NULL);
}

/* Every icon's (common, segment) pair must light nothing else. */
static bool check_pair(struct layout *l, size_t i)
{
	const struct gp_icon *icon = &l->design->icons[i];
	struct icon_work *w = &l->icons[i];
	if (w->common >= l->first_icon_net || w->segment >= l->first_icon_net)
		return true;
	char what[160];
	if (!taken(l, i, w->common, w->segment, what, sizeof(what)))
		return true;
	const struct gp_net *nets = l->build->art.nets;
	char spare[200] = "";
	for (size_t k = 0; k < l->slot_count; k++) {
		const struct slot *s = &l->slots[k];
		char other[160];
		if (s->used || taken(l, l->design->icon_count, s->common,
				     s->segment, other, sizeof(other)))
			continue;
		snprintf(spare, sizeof(spare), "; a spare slot is %s x %s "
			 "(digit %d of row '%s'), or use 'slot: auto'",
			 nets[s->common].name, nets[s->segment].name, s->digit,
			 l->design->digits[s->row].name);
		break;
	}
	return gp_diag_error(l->diag, &icon->common_where,
			     "icon '%s' uses %s x %s, which already lights %s; "
			     "each icon needs a (common, segment) pair of its "
			     "own%s", icon->name, nets[w->common].name,
			     nets[w->segment].name, what, spare);
}

static bool assign_nets(struct layout *l)
{
	const struct gp_design *d = l->design;
	l->first_icon_net = (int)l->build->art.net_count;
	bool ok = make_pair_table(l) && find_slots(l);
	for (size_t i = 0; ok && i < d->icon_count; i++) {
		const struct gp_icon *icon = &d->icons[i];
		struct icon_work *w = &l->icons[i];
		w->common = w->segment = -1;
		w->slot_row = -1;
		if (icon->auto_slot)
			continue;
		size_t errors = l->diag->errors;
		w->common = icon_common(l, i);
		w->segment = icon_segment(l, i);
		if (l->diag->errors != errors) {
			ok = false;
			continue;
		}
		if (w->common < 0 || w->segment < 0)
			return gp_diag_error(l->diag, &icon->common_where,
					     "icon '%s': no net for its common "
					     "or segment", icon->name);
		ok = check_pair(l, i);
	}
	/* explicit pairs first, so that an automatic one takes none of
	 * them */
	for (size_t i = 0; ok && i < d->icon_count; i++)
		if (d->icons[i].auto_slot)
			ok = assign_slot(l, i);
	return ok;
}

/* --- icons apart ----------------------------------------------------------- */

/* A front shape to keep apart from: an icon's part, or an earlier
 * stage's electrode. */
struct front_item {
	const struct gp_polygon *poly;
	int icon;                 /* icon index, or -1 for earlier shapes */
	int net;
};

static bool report_apart(struct layout *l, const struct front_item *a,
			 const struct front_item *b, struct gp_point near,
			 double distance)
{
	const struct gp_design *d = l->design;
	const struct gp_icon *icon = &d->icons[b->icon >= 0 ? b->icon : a->icon];
	const struct front_item *other = b->icon >= 0 ? a : b;
	char at[80], what[200], s[32], dist[32];
	where_mm(at, sizeof(at), near);
	if (other->icon >= 0)
		snprintf(what, sizeof(what), "icon '%s'",
			 d->icons[other->icon].name);
	else
		snprintf(what, sizeof(what), "the electrode of %s",
			 l->build->art.nets[other->net].name);
	fmt(s, sizeof(s), d->rules.min_space);
	fmt(dist, sizeof(dist), (int64_t)(distance + 0.5));
	if (distance <= 0)
		return gp_diag_error(l->diag, &icon->where,
				     "icon '%s' overlaps %s near %s mm on the "
				     "front plate; move one of them (each "
				     "icon is a pixel of its own)", icon->name,
				     what, at);
	return gp_diag_error(l->diag, &icon->where,
			     "icon '%s' is %s mm from %s near %s mm, closer "
			     "than min_space %s mm; move them apart",
			     icon->name, dist, what, at, s);
}

/* Icons may not overlap each other or what the blocks and digits put on
 * the front plate, nor come closer than min_space to another net there
 * (GEOS cannot take overlapping parts of one shape set either). */
static bool check_apart(struct layout *l)
{
	const struct gp_artwork *art = &l->build->art;
	enum gp_layer layer = gp_plate_ito_layer(l->front_plate);
	size_t n = 0;
	for (size_t i = 0; i < l->design->icon_count; i++)
		n += l->icons[i].front.count;
	for (size_t i = 0; i < art->shape_count; i++)
		n += art->shapes[i].layer == layer && !art->shapes[i].open_path;
	struct front_item *items = calloc(n ? n : 1, sizeof(*items));
	struct gp_box *boxes = calloc(n ? n : 1, sizeof(*boxes));
	struct gp_index_pair *pairs = NULL;
	size_t pair_count = 0, k = 0;
	bool ok = items && boxes;
	for (size_t i = 0; ok && i < l->design->icon_count; i++)
		for (size_t p = 0; p < l->icons[i].front.count; p++)
			items[k++] = (struct front_item){
				&l->icons[i].front.items[p], (int)i,
				l->icons[i].segment };
	for (size_t i = 0; ok && i < art->shape_count; i++)
		if (art->shapes[i].layer == layer && !art->shapes[i].open_path)
			items[k++] = (struct front_item){ &art->shapes[i].poly,
							  -1, art->shapes[i].net };
	for (size_t i = 0; ok && i < k; i++)
		boxes[i] = gp_polygon_bounds(items[i].poly);
	int64_t space = l->design->rules.min_space;
	ok = ok && gp_geos_box_pairs(l->geos, boxes, k, space, &pairs,
				     &pair_count);
	bool apart = true;
	for (size_t q = 0; ok && q < pair_count; q++) {
		const struct front_item *a = &items[pairs[q].a];
		const struct front_item *b = &items[pairs[q].b];
		/* parts of one icon are checked by check_space; parts of one
		 * net may touch, not overlap */
		if ((a->icon < 0 && b->icon < 0) || a->icon == b->icon)
			continue;
		struct gp_geos_shape *sa =
			gp_geos_shape_from_polygon(l->geos, a->poly);
		struct gp_geos_shape *sb =
			gp_geos_shape_from_polygon(l->geos, b->poly);
		double d = 0;
		struct gp_point pa = { 0, 0 }, pb = { 0, 0 };
		ok = sa && sb && gp_geos_shape_distance(l->geos, sa, sb, &d) &&
		     gp_geos_shape_nearest(l->geos, sa, sb, &pa, &pb);
		bool overlap = ok && d <= 0 &&
			       gp_geos_shape_overlaps_area(l->geos, sa, sb);
		gp_geos_shape_destroy(l->geos, sa);
		gp_geos_shape_destroy(l->geos, sb);
		if (!ok)
			break;
		bool same = a->net == b->net;
		if (overlap || (!same && d < (double)space)) {
			struct gp_point at = { (pa.x + pb.x) / 2,
					       (pa.y + pb.y) / 2 };
			if (overlap)
				at = gp_box_centre(gp_box_make(
					max64i(boxes[pairs[q].a].x0, boxes[pairs[q].b].x0),
					max64i(boxes[pairs[q].a].y0, boxes[pairs[q].b].y0),
					min64i(boxes[pairs[q].a].x1, boxes[pairs[q].b].x1),
					min64i(boxes[pairs[q].a].y1, boxes[pairs[q].b].y1)));
			report_apart(l, a, b, at, overlap ? 0 : d);
			apart = false;
		}
	}
	free(pairs);
	free(items);
	free(boxes);
	if (!ok)
		return gp_diag_oom(l->diag, NULL);
	return apart;
}

/* --- front bridges ------------------------------------------------------- */

/* Front shapes of other nets, which a front bridge keeps min_space from. */
static struct gp_geos_shape *front_of_others(struct layout *l, size_t self)
{
	struct gp_polyset all;
	gp_polyset_init(&all);
	const struct gp_artwork *art = &l->build->art;
	enum gp_layer layer = gp_plate_ito_layer(l->front_plate);
	bool ok = true;
	for (size_t i = 0; ok && i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		if (s->layer != layer || s->open_path ||
		    s->net == l->icons[self].segment)
			continue;
		struct gp_polygon copy;
		ok = gp_polygon_copy(&copy, &s->poly) &&
		     gp_polyset_take(&all, &copy);
	}
	for (size_t i = 0; ok && i < l->design->icon_count; i++) {
		if (l->icons[i].segment == l->icons[self].segment)
			continue;
		for (size_t k = 0; ok && k < l->icons[i].front.count; k++) {
			struct gp_polygon copy;
			ok = gp_polygon_copy(&copy,
					     &l->icons[i].front.items[k]) &&
			     gp_polyset_take(&all, &copy);
		}
	}
	struct gp_geos_shape *shape =
		ok ? gp_geos_shape_from_polyset(l->geos, &all) : NULL;
	gp_polyset_finish(&all);
	return shape;
}

static bool unjoined(struct layout *l, const struct gp_icon *icon,
		     struct gp_point at, const char *plate)
{
	char where[80];
	where_mm(where, sizeof(where), at);
	return gp_diag_error(l->diag, &icon->where,
			     "icon '%s': cannot join its parts near %s mm on "
			     "the %s plate without coming too close to other "
			     "electrodes; move the parts closer together or "
			     "make room around them", icon->name, where,
			     plate);
}

static bool front_bridges(struct layout *l, size_t i)
{
	struct icon_work *w = &l->icons[i];
	if (w->front.count < 2)
		return true;
	struct gp_keepout keep = { front_of_others(l, i),
				   l->design->rules.min_space };
	if (!keep.shape)
		return gp_diag_oom(l->diag, NULL);
	size_t missing = 0;
	struct gp_point at = { 0, 0 };
	bool ok = gp_bridges_join(l->geos, &w->front,
				  l->design->rules.min_line, &keep,
				  gp_geos_shape_is_empty(l->geos, keep.shape)
					  ? 0 : 1,
				  &w->bridges, &missing, &at);
	gp_geos_shape_destroy(l->geos, keep.shape);
	if (ok && missing)
		return unjoined(l, &l->design->icons[i], at, "front");
	return ok;
}

/* --- back patches ------------------------------------------------------ */

static bool make_groups(struct layout *l)
{
	size_t n = l->design->icon_count;
	l->group_net = calloc(n, sizeof(*l->group_net));
	if (!l->group_net)
		return gp_diag_oom(l->diag, NULL);
	for (size_t i = 0; i < n; i++) {
		size_t g = 0;
		while (g < l->group_count &&
		       l->group_net[g] != l->icons[i].common)
			g++;
		if (g == l->group_count)
			l->group_net[l->group_count++] = l->icons[i].common;
		l->icons[i].group = g;
	}
	l->patches = calloc(l->group_count, sizeof(*l->patches));
	if (!l->patches)
		return gp_diag_oom(l->diag, NULL);
	for (size_t g = 0; g < l->group_count; g++)
		gp_polyset_init(&l->patches[g]);
	return true;
}

static bool copy_into(struct gp_polyset *dst, const struct gp_polyset *src)
{
	for (size_t k = 0; k < src->count; k++) {
		struct gp_polygon copy;
		if (!gp_polygon_copy(&copy, &src->items[k]))
			return false;
		if (!gp_polyset_take(dst, &copy)) {
			gp_polygon_finish(&copy);
			return false;
		}
	}
	return true;
}

/* Copies of the front-plate shapes earlier stages made (not lines). */
static bool earlier_front(struct layout *l, struct gp_polyset *out)
{
	const struct gp_artwork *art = &l->build->art;
	enum gp_layer layer = gp_plate_ito_layer(l->front_plate);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		struct gp_polygon copy;
		if (s->layer != layer || s->open_path)
			continue;
		if (!gp_polygon_copy(&copy, &s->poly) ||
		    !gp_polyset_take(out, &copy))
			return false;
	}
	return true;
}

/* Every front-plate trace a patch must keep clear of: the icons' bridges
 * and whatever earlier stages put on the front plate. */
static bool front_traces(struct layout *l, struct gp_polyset *traces)
{
	if (!earlier_front(l, traces))
		return false;
	for (size_t i = 0; i < l->design->icon_count; i++)
		if (!copy_into(traces, &l->icons[i].bridges))
			return false;
	return true;
}

static void patch_name(struct layout *l, size_t g, char *buf, size_t size)
{
	snprintf(buf, size, "icons on %s",
		 l->build->art.nets[l->group_net[g]].name);
}

/* Notches can cut slivers off a patch that lie over no front shape:
 * floating ITO that lights nothing; they are left out. */
static bool drop_floating(struct layout *l, const struct gp_polyset *front,
			  struct gp_polyset *patch)
{
	struct gp_geos_shape *f = gp_geos_shape_from_polyset(l->geos, front);
	bool *keep = calloc(patch->count ? patch->count : 1, sizeof(*keep));
	bool ok = f && keep;
	for (size_t k = 0; ok && k < patch->count; k++) {
		struct gp_geos_shape *p =
			gp_geos_shape_from_polygon(l->geos, &patch->items[k]);
		ok = p != NULL;
		keep[k] = ok && gp_geos_shape_overlaps_area(l->geos, f, p);
		gp_geos_shape_destroy(l->geos, p);
	}
	size_t kept = 0;
	for (size_t k = 0; ok && k < patch->count; k++) {
		if (keep[k])
			patch->items[kept++] = patch->items[k];
		else
			gp_polygon_finish(&patch->items[k]);
	}
	if (ok)
		patch->count = kept;
	free(keep);
	gp_geos_shape_destroy(l->geos, f);
	return ok;
}

/* How far a plate can move under the registration tolerance, which holds
 * in x and in y at once: the diagonal of the tolerance box, so that a
 * front trace stays off every patch (and a back bridge off the front)
 * under any shift the glass maker may make. */
static int64_t shift_reach(const struct gp_rules *r)
{
	return (int64_t)ceil((double)r->registration * sqrt(2.0));
}

/* Front ITO that is not icon i's: earlier stages' shapes, other icons'
 * electrodes and bridges. */
static bool copy_near(struct gp_polyset *dst, const struct gp_polyset *src,
		      struct gp_box box);

static bool box_meets(struct gp_box a, struct gp_box b)
{
	return !(a.x1 < b.x0 || a.x0 > b.x1 || a.y1 < b.y0 || a.y0 > b.y1);
}

/* Only what lies within box can change the margin given back near an
 * icon's bridges: the rest is left out, which keeps the work per icon
 * from growing with the whole glass. */
static bool foreign_front(struct layout *l, size_t self, struct gp_box box,
			  struct gp_polyset *out)
{
	const struct gp_artwork *art = &l->build->art;
	enum gp_layer layer = gp_plate_ito_layer(l->front_plate);
	for (size_t i = 0; i < art->shape_count; i++) {
		const struct gp_shape *s = &art->shapes[i];
		struct gp_polygon copy;
		if (s->layer != layer || s->open_path ||
		    !box_meets(gp_polygon_bounds(&s->poly), box))
			continue;
		if (!gp_polygon_copy(&copy, &s->poly) ||
		    !gp_polyset_take(out, &copy))
			return false;
	}
	for (size_t i = 0; i < l->design->icon_count; i++)
		if (i != self && (!copy_near(out, &l->icons[i].front, box) ||
				  !copy_near(out, &l->icons[i].bridges, box)))
			return false;
	return true;
}

static bool other_patches_set(struct layout *l, size_t group, struct gp_box box,
			      struct gp_polyset *out)
{
	for (size_t g = 0; g < l->group_count; g++)
		if (g != group && !copy_near(out, &l->patches[g], box))
			return false;
	return true;
}

/* Where a bridge leaves one of the icon's own letters, the notch would
 * take the letter's registration margin with it, and any plate shift
 * would bite into the letter there.  The margin is given back: the patch
 * keeps the letters grown by the margin box wherever the icon's own
 * bridges pass, except near anything else on the front and near other
 * commons' patches.  The first margin's length of each bridge then lights
 * with its letter (a spur no wider than the bridge, recorded with the
 * pixel); beyond it the bridge stays dark under any shift. */
static bool reclaim_margin(struct layout *l, size_t i)
{
	struct icon_work *w = &l->icons[i];
	if (w->bridges.count == 0)
		return true;
	const struct gp_rules *r = &l->design->rules;
	int64_t reach = shift_reach(r) + r->chord_tolerance;
	struct gp_polyset ring, near, want, foreign, away, others, apart, add,
		step, merged;
	struct gp_polyset *all[] = { &ring, &near, &want, &foreign, &away,
				     &others, &apart, &add, &step, &merged };
	for (size_t k = 0; k < 10; k++)
		gp_polyset_init(all[k]);
	struct gp_polyset *patch = &l->patches[w->group];
	/* what is wanted lies within reach of the bridges; what can take
	 * from it within reach (or min_space) of that */
	struct gp_box box = gp_box_none();
	for (size_t k = 0; k < w->bridges.count; k++)
		box = gp_box_union(box, gp_polygon_bounds(&w->bridges.items[k]));
	int64_t grow = 2 * reach + r->min_space + r->chord_tolerance + 1000;
	box = gp_box_make(box.x0 - grow, box.y0 - grow, box.x1 + grow,
			  box.y1 + grow);
	bool ok =
		gp_geos_dilate_box(l->geos, &w->front, r->registration,
				   r->registration, &ring) &&
		gp_geos_offset(l->geos, &w->bridges, reach, GP_JOIN_ROUND,
			       r->chord_tolerance, &near) &&
		gp_geos_intersection(l->geos, &ring, &near, &want) &&
		foreign_front(l, i, box, &foreign) &&
		gp_geos_offset(l->geos, &foreign, reach, GP_JOIN_ROUND,
			       r->chord_tolerance, &away) &&
		other_patches_set(l, w->group, box, &others) &&
		gp_geos_offset(l->geos, &others, r->min_space, GP_JOIN_ROUND,
			       r->chord_tolerance, &apart) &&
		gp_geos_difference(l->geos, &want, &away, &step) &&
		gp_geos_difference(l->geos, &step, &apart, &add) &&
		copy_into(&add, patch) &&
		gp_geos_union_set(l->geos, &add, &merged);
	if (ok) {
		gp_polyset_finish(patch);
		*patch = merged;
		gp_polyset_init(&merged);
	}
	for (size_t k = 0; k < 10; k++)
		gp_polyset_finish(all[k]);
	return ok;
}

/* The parts of icon i's bridges that light with it: over its patch. */
static bool lit_spurs(struct layout *l, size_t i, struct gp_polyset *out)
{
	struct icon_work *w = &l->icons[i];
	struct gp_polyset over;
	gp_polyset_init(&over);
	bool ok = w->bridges.count == 0 ||
		  (gp_geos_intersection(l->geos, &w->bridges,
					&l->patches[w->group], &over) &&
		   gp_geos_difference(l->geos, &over, &w->front, out));
	gp_polyset_finish(&over);
	return ok;
}

static bool make_patches(struct layout *l)
{
	const struct gp_rules *r = &l->design->rules;
	struct gp_polyset *fronts = calloc(l->group_count, sizeof(*fronts));
	struct gp_patch_group *groups = calloc(l->group_count,
					       sizeof(*groups));
	char (*names)[64] = calloc(l->group_count, sizeof(*names));
	struct gp_polyset traces;
	gp_polyset_init(&traces);
	bool ok = fronts && groups && names && front_traces(l, &traces);
	for (size_t g = 0; ok && g < l->group_count; g++) {
		gp_polyset_init(&fronts[g]);
		for (size_t i = 0; ok && i < l->design->icon_count; i++)
			if (l->icons[i].group == g)
				ok = copy_into(&fronts[g], &l->icons[i].front);
		patch_name(l, g, names[g], sizeof(names[g]));
		groups[g] = (struct gp_patch_group){ names[g], fronts[g].items,
						     fronts[g].count };
	}
	struct gp_patch_rules rules = {
		.margin = r->registration,
		.min_space = r->min_space,
		.clearance = shift_reach(r),
		.chord_tolerance = r->chord_tolerance,
	};
	ok = ok && gp_patch_make(l->geos, groups, l->group_count, traces.items,
				 traces.count, &rules, l->patches, l->diag);
	for (size_t g = 0; ok && g < l->group_count; g++)
		ok = drop_floating(l, &fronts[g], &l->patches[g]);
	for (size_t i = 0; ok && i < l->design->icon_count; i++)
		ok = reclaim_margin(l, i);
	for (size_t g = 0; fronts && g < l->group_count; g++)
		gp_polyset_finish(&fronts[g]);
	free(fronts);
	free(groups);
	free(names);
	gp_polyset_finish(&traces);
	return ok || gp_diag_oom(l->diag, NULL);
}

/* The front plate's ITO but icon i's own electrode: what a back bridge of
 * icon i must stay off under any shift.  (Back ITO over its own electrode
 * changes nothing: the patch covers that under every shift already.) */
static struct gp_geos_shape *front_except(struct layout *l, size_t self)
{
	struct gp_polyset all;
	gp_polyset_init(&all);
	bool ok = front_traces(l, &all);
	for (size_t i = 0; ok && i < l->design->icon_count; i++)
		if (i != self)
			ok = copy_into(&all, &l->icons[i].front);
	struct gp_geos_shape *s =
		ok ? gp_geos_shape_from_polyset(l->geos, &all) : NULL;
	gp_polyset_finish(&all);
	return s;
}

static struct gp_geos_shape *other_patches(struct layout *l, size_t group)
{
	struct gp_polyset all;
	gp_polyset_init(&all);
	bool ok = true;
	for (size_t g = 0; ok && g < l->group_count; g++)
		if (g != group)
			ok = copy_into(&all, &l->patches[g]);
	struct gp_geos_shape *s =
		ok ? gp_geos_shape_from_polyset(l->geos, &all) : NULL;
	gp_polyset_finish(&all);
	return s;
}

/* The pieces of the group's patch under this icon's electrode. */
static bool patch_pieces(struct layout *l, size_t i, struct gp_polyset *out)
{
	const struct gp_polyset *patch = &l->patches[l->icons[i].group];
	struct gp_geos_shape *front =
		gp_geos_shape_from_polyset(l->geos, &l->icons[i].front);
	bool ok = front != NULL;
	for (size_t k = 0; ok && k < patch->count; k++) {
		struct gp_geos_shape *p =
			gp_geos_shape_from_polygon(l->geos, &patch->items[k]);
		ok = p != NULL;
		if (ok && gp_geos_shape_overlaps_area(l->geos, front, p)) {
			struct gp_polygon copy;
			ok = gp_polygon_copy(&copy, &patch->items[k]) &&
			     gp_polyset_take(out, &copy);
		}
		gp_geos_shape_destroy(l->geos, p);
	}
	gp_geos_shape_destroy(l->geos, front);
	return ok;
}

static bool back_bridges(struct layout *l, size_t i)
{
	struct gp_polyset pieces;
	gp_polyset_init(&pieces);
	bool ok = patch_pieces(l, i, &pieces);
	if (!ok || pieces.count < 2) {
		gp_polyset_finish(&pieces);
		return ok;
	}
	const struct gp_rules *r = &l->design->rules;
	struct gp_keepout keep[2] = {
		{ front_except(l, i), shift_reach(r) },
		{ other_patches(l, l->icons[i].group), r->min_space },
	};
	size_t missing = 0, n = 0;
	struct gp_point at = { 0, 0 };
	struct gp_keepout used[2];
	for (int k = 0; k < 2; k++)
		if (keep[k].shape &&
		    !gp_geos_shape_is_empty(l->geos, keep[k].shape))
			used[n++] = keep[k];
	ok = keep[0].shape && keep[1].shape &&
	     gp_bridges_join(l->geos, &pieces, r->min_line, used, n,
			     &l->icons[i].back_bridges, &missing, &at);
	gp_geos_shape_destroy(l->geos, keep[0].shape);
	gp_geos_shape_destroy(l->geos, keep[1].shape);
	gp_polyset_finish(&pieces);
	if (ok && missing)
		return unjoined(l, &l->design->icons[i], at, "back");
	return ok;
}

/* --- into the artwork --------------------------------------------------- */

static bool add_set(struct layout *l, struct gp_polyset *set,
		    enum gp_plate plate, enum gp_role role, int net)
{
	for (size_t k = 0; k < set->count; k++) {
		struct gp_polygon copy;
		if (!gp_polygon_copy(&copy, &set->items[k]))
			return false;
		if (!gp_artwork_add_shape(&l->build->art,
					  gp_plate_ito_layer(plate), role, net,
					  &copy)) {
			gp_polygon_finish(&copy);
			return false;
		}
	}
	return true;
}

/* One pixel per icon.  Its nominal lit region is the electrode and the
 * spurs of its bridges over the patch, united (so that its parts neither
 * overlap nor touch): shape holds the first part, more the rest. */
static bool add_pixel(struct layout *l, size_t i)
{
	struct icon_work *w = &l->icons[i];
	struct gp_polyset parts, region;
	gp_polyset_init(&parts);
	gp_polyset_init(&region);
	bool ok = copy_into(&parts, &w->front) && lit_spurs(l, i, &parts) &&
		  gp_geos_union_set(l->geos, &parts, &region) &&
		  region.count > 0;
	struct gp_box box = gp_box_none();
	for (size_t k = 0; ok && k < region.count; k++)
		box = gp_box_union(box, gp_polygon_bounds(&region.items[k]));
	struct gp_pixel *p = ok ? gp_artwork_add_pixel(&l->build->art,
						       w->common, w->segment,
						       box)
				: NULL;
	ok = p != NULL;
	if (ok) {
		p->owner_kind = GP_OWNER_ICON;
		p->owner = (int)i;
		p->shape = region.items[0];
		gp_polygon_init(&region.items[0]);
		for (size_t k = 1; ok && k < region.count; k++)
			ok = gp_polyset_take(&p->more, &region.items[k]);
	}
	gp_polyset_finish(&parts);
	gp_polyset_finish(&region);
	return ok;
}

/* The parts of src whose bounds meet box.  Only the back patch near an
 * icon can light it under a shift, so copying just those keeps the
 * registration sums linear in the number of icons on one common. */
static bool copy_near(struct gp_polyset *dst, const struct gp_polyset *src,
		      struct gp_box box)
{
	for (size_t k = 0; k < src->count; k++) {
		struct gp_box b = gp_polygon_bounds(&src->items[k]);
		if (b.x1 < box.x0 || b.x0 > box.x1 || b.y1 < box.y0 ||
		    b.y0 > box.y1)
			continue;
		struct gp_polygon copy;
		if (!gp_polygon_copy(&copy, &src->items[k]))
			return false;
		if (!gp_polyset_take(dst, &copy)) {
			gp_polygon_finish(&copy);
			return false;
		}
	}
	return true;
}

/* Summary: nets, area and what the registration margin keeps lit. */
static bool note_icon(struct layout *l, size_t i)
{
	struct icon_work *w = &l->icons[i];
	const struct gp_rules *r = &l->design->rules;
	struct gp_polyset back;
	gp_polyset_init(&back);
	struct gp_registration reg;
	struct gp_box near = gp_box_none();
	for (size_t k = 0; k < w->front.count; k++)
		near = gp_box_union(near, gp_polygon_bounds(&w->front.items[k]));
	near = gp_box_make(near.x0 - 2 * r->registration,
			   near.y0 - 2 * r->registration,
			   near.x1 + 2 * r->registration,
			   near.y1 + 2 * r->registration);
	bool ok = copy_near(&back, &l->patches[w->group], near) &&
		  copy_into(&back, &w->back_bridges) &&
		  gp_patch_registration(l->geos, &w->front, &back,
					r->registration, r->registration,
					&reg);
	gp_polyset_finish(&back);
	if (!ok)
		return false;
	char m[32];
	fmt(m, sizeof(m), r->registration);
	const struct gp_net *nets = l->build->art.nets;
	char slot[160] = "";
	if (w->slot_row >= 0)
		snprintf(slot, sizeof(slot), ", spare slot of digit %d of row "
			 "'%s'", w->slot_digit,
			 l->design->digits[w->slot_row].name);
	else if (l->design->icons[i].auto_slot)
		snprintf(slot, sizeof(slot), ", chosen (no spare slot left)");
	gp_buffer_printf(&l->build->notes,
			 "icon %s: %s x %s%s, %zu part(s), %zu front and %zu "
			 "back bridge(s), area %.6f mm^2, least lit under "
			 "+-%s mm shift %.6f mm^2\n",
			 l->design->icons[i].name, nets[w->common].name,
			 nets[w->segment].name, slot, w->front.count,
			 w->bridges.count, w->back_bridges.count,
			 reg.front_mm2, m, reg.worst_mm2);
	return true;
}

static bool emit(struct layout *l)
{
	for (size_t i = 0; i < l->design->icon_count; i++) {
		struct icon_work *w = &l->icons[i];
		if (!add_set(l, &w->front, l->front_plate, GP_ROLE_ELECTRODE,
			     w->segment) ||
		    !add_set(l, &w->bridges, l->front_plate, GP_ROLE_BRIDGE,
			     w->segment) ||
		    !add_set(l, &w->back_bridges, l->back_plate,
			     GP_ROLE_BRIDGE, w->common) ||
		    !add_pixel(l, i))
			return gp_diag_oom(l->diag, NULL);
	}
	for (size_t g = 0; g < l->group_count; g++)
		if (!add_set(l, &l->patches[g], l->back_plate, GP_ROLE_PATCH,
			     l->group_net[g]))
			return gp_diag_oom(l->diag, NULL);
	return true;
}

/* --- lead ends ----------------------------------------------------------- */

/* The routing stage leads each net out straight towards one side of the
 * glass, from an end the electrode offers.  For every side: the part's
 * outermost corner that way, moved one lead width inwards so that the lead
 * overlaps the part rather than touching a point of it. */
static bool offer_ends(struct layout *l, int net, const struct gp_polyset *set)
{
	int64_t width = 2 * l->design->rules.min_line;
	for (int side = 0; side < GP_SIDE_COUNT; side++) {
		struct gp_point best = { 0, 0 };
		int64_t best_key = INT64_MIN;
		for (size_t k = 0; k < set->count; k++) {
			const struct gp_ring *ring = &set->items[k].outer;
			for (size_t j = 0; j < ring->count; j++) {
				struct gp_point p = ring->points[j];
				int64_t key = side == GP_SIDE_BOTTOM ? -p.y
					      : side == GP_SIDE_RIGHT ? p.x
					      : side == GP_SIDE_TOP   ? p.y
								      : -p.x;
				if (key > best_key) {
					best_key = key;
					best = p;
				}
			}
		}
		if (best_key == INT64_MIN)
			return true;
		switch (side) {
		case GP_SIDE_BOTTOM: best.y += width; break;
		case GP_SIDE_RIGHT: best.x -= width; break;
		case GP_SIDE_TOP: best.y -= width; break;
		default: best.x += width; break;
		}
		if (!gp_build_add_lead_end(l->build, net, (enum gp_side)side,
					   best, width))
			return gp_diag_oom(l->diag, NULL);
	}
	return true;
}

/* Ends for every icon's segment and for its own common's patch (a common
 * shared with a dot-matrix row is led out from the row's strips). */
static bool offer_all_ends(struct layout *l)
{
	for (size_t i = 0; i < l->design->icon_count; i++) {
		struct icon_work *w = &l->icons[i];
		/* nets of the blocks and digits are led out their way */
		if (w->segment >= l->first_icon_net &&
		    !offer_ends(l, w->segment, &w->front))
			return false;
		if (w->common >= l->first_icon_net &&
		    !offer_ends(l, w->common, &l->patches[w->group]))
			return false;
	}
	return true;
}

/* --- the stage ------------------------------------------------------------ */

static void layout_finish(struct layout *l)
{
	for (size_t i = 0; l->icons && i < l->design->icon_count; i++) {
		gp_polyset_finish(&l->icons[i].front);
		gp_polyset_finish(&l->icons[i].bridges);
		gp_polyset_finish(&l->icons[i].back_bridges);
	}
	for (size_t g = 0; l->patches && g < l->group_count; g++)
		gp_polyset_finish(&l->patches[g]);
	for (size_t i = 0; i < l->font_count; i++)
		gp_font_destroy(l->fonts[i].font);
	free(l->fonts);
	free(l->icons);
	free(l->group_net);
	free(l->patches);
	free(l->pairs);
	free(l->slots);
	free(l->base_dir);
	gp_geos_destroy(l->geos);
}

static bool make_all_fronts(struct layout *l)
{
	bool ok = true;
	for (size_t i = 0; i < l->design->icon_count; i++)
		ok &= make_front(l, &l->design->icons[i], &l->icons[i].front);
	return ok;
}

static bool make_all_bridges(struct layout *l)
{
	bool ok = true;
	for (size_t i = 0; i < l->design->icon_count; i++)
		ok &= front_bridges(l, i);
	if (!ok || !make_patches(l))
		return false;
	for (size_t i = 0; i < l->design->icon_count; i++)
		ok &= back_bridges(l, i);
	return ok;
}

bool gp_icons_layout(struct gp_build *build, struct gp_diag *diag)
{
	const struct gp_design *d = build->design;
	if (d->icon_count == 0)
		return true;
	struct layout l = {
		.build = build,
		.design = d,
		.diag = diag,
		.front_plate = d->segment_plate,
		.back_plate = gp_common_plate(d),
	};
	l.geos = gp_geos_create(diag);
	l.icons = calloc(d->icon_count, sizeof(*l.icons));
	l.base_dir = directory_of(d->spec->file);
	bool ok = l.geos && l.icons;
	for (size_t i = 0; ok && i < d->icon_count; i++) {
		gp_polyset_init(&l.icons[i].front);
		gp_polyset_init(&l.icons[i].bridges);
		gp_polyset_init(&l.icons[i].back_bridges);
	}
	if (!ok)
		gp_diag_oom(l.diag, NULL);
	ok = ok && make_all_fronts(&l) && assign_nets(&l) && check_apart(&l) &&
	     make_groups(&l) && make_all_bridges(&l) && emit(&l) &&
	     offer_all_ends(&l);
	for (size_t i = 0; ok && i < d->icon_count; i++)
		ok = note_icon(&l, i);
	if (ok) {
		char tol[32];
		fmt(tol, sizeof(tol), d->rules.chord_tolerance);
		gp_buffer_printf(&build->notes, "icons: %zu, curves flattened "
				 "within %s mm\n", d->icon_count, tol);
	}
	layout_finish(&l);
	return ok;
}
