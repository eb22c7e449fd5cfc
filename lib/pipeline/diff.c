/* Comparing two builds: per layer and per net, what was added, removed,
 * moved (and by how much) or reshaped, through GEOS differences. */
#include "build.h"
#include "staged-file.h"
#include "geos.h"
#include "proof.h"
#include "units.h"

#include <cairo-pdf.h>
#include <cairo.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Differences smaller than this are rounding noise of GEOS, not changes:
 * 1e-9 mm^2 is one square micrometre's thousandth. */
#define SAME_AREA_MM2 1e-9

/* All shapes of one layer that belong to one net (or one role for shapes
 * without a net), merged. */
struct group {
	enum gp_layer layer;
	char name[32];
	struct gp_geos_shape *shape;
};

struct group_list {
	struct group *items;
	size_t count;
};

struct gp_diff {
	struct gp_geos *geos;
	struct gp_buffer text;
	size_t changes;
	struct gp_box frame;
	/* what changed, for the picture: old-only and new-only areas */
	struct gp_polyset removed, added;
};

static void group_name(const struct gp_artwork *art,
		       const struct gp_shape *s, char *name, size_t size)
{
	if (s->net >= 0)
		snprintf(name, size, "%s", art->nets[s->net].name);
	else
		snprintf(name, size, "(%s)", gp_role_name(s->role));
}

static struct group *find_group(struct group_list *list, enum gp_layer layer,
				const char *name)
{
	for (size_t i = 0; i < list->count; i++)
		if (list->items[i].layer == layer &&
		    strcmp(list->items[i].name, name) == 0)
			return &list->items[i];
	return NULL;
}

/* Shapes drawn as lines count as their bounding outline: a change of the
 * path still shows as a change of that outline's region. */
static struct gp_geos_shape *shape_of(struct gp_geos *geos,
				      const struct gp_shape *s)
{
	if (s->line_width <= 0)
		return gp_geos_shape_from_polygon(geos, &s->poly);
	struct gp_box b = gp_polygon_bounds(&s->poly);
	int64_t h = s->line_width / 2;
	return gp_geos_shape_from_box(
		geos, gp_box_grow(b, h));
}

static bool add_to_group(struct gp_geos *geos, struct group_list *list,
			 const struct gp_artwork *art, const struct gp_shape *s)
{
	char name[32];
	group_name(art, s, name, sizeof(name));
	struct gp_geos_shape *piece = shape_of(geos, s);
	if (!piece)
		return false;
	struct group *g = find_group(list, s->layer, name);
	if (!g) {
		struct group *items = realloc(list->items, (list->count + 1) *
								   sizeof(*items));
		if (!items) {
			gp_geos_shape_destroy(geos, piece);
			return false;
		}
		list->items = items;
		g = &items[list->count++];
		g->layer = s->layer;
		snprintf(g->name, sizeof(g->name), "%s", name);
		g->shape = piece;
		return true;
	}
	struct gp_geos_shape *both[2] = { g->shape, piece };
	struct gp_geos_shape *merged = gp_geos_shape_union(geos, both, 2);
	gp_geos_shape_destroy(geos, piece);
	if (!merged)
		return false;
	gp_geos_shape_destroy(geos, g->shape);
	g->shape = merged;
	return true;
}

static bool collect(struct gp_geos *geos, const struct gp_artwork *art,
		    struct group_list *list)
{
	for (size_t i = 0; i < art->shape_count; i++)
		if (!add_to_group(geos, list, art, &art->shapes[i]))
			return false;
	return true;
}

static void free_groups(struct gp_geos *geos, struct group_list *list)
{
	for (size_t i = 0; i < list->count; i++)
		gp_geos_shape_destroy(geos, list->items[i].shape);
	free(list->items);
}

static double difference_area(struct gp_diff *diff,
			      const struct gp_geos_shape *a,
			      const struct gp_geos_shape *b,
			      struct gp_polyset *keep)
{
	struct gp_geos_shape *d = gp_geos_shape_difference(diff->geos, a, b);
	if (!d)
		return -1;
	double area = gp_geos_shape_area_mm2(diff->geos, d);
	if (keep && area > SAME_AREA_MM2)
		gp_geos_shape_to_polyset(diff->geos, d, keep);
	gp_geos_shape_destroy(diff->geos, d);
	return area;
}

/* Is b exactly a moved by the shift of their lower-left corners? */
static bool is_move(struct gp_diff *diff, const struct gp_geos_shape *a,
		    const struct gp_geos_shape *b, int64_t *dx, int64_t *dy)
{
	struct gp_box ba = gp_geos_shape_bounds(a), bb = gp_geos_shape_bounds(b);
	*dx = bb.x0 - ba.x0;
	*dy = bb.y0 - ba.y0;
	struct gp_geos_shape *moved = gp_geos_shape_translate(diff->geos, a,
							      *dx, *dy);
	if (!moved)
		return false;
	double lost = difference_area(diff, moved, b, NULL);
	double gained = difference_area(diff, b, moved, NULL);
	gp_geos_shape_destroy(diff->geos, moved);
	return lost >= 0 && gained >= 0 && lost + gained < SAME_AREA_MM2;
}

static void report_change(struct gp_diff *diff, const struct group *old,
			  const struct group *new)
{
	double removed = difference_area(diff, old->shape, new->shape,
					 &diff->removed);
	double added = difference_area(diff, new->shape, old->shape,
				       &diff->added);
	if (removed + added < SAME_AREA_MM2)
		return;
	diff->changes++;
	int64_t dx, dy;
	const char *layer = gp_layer_name(old->layer);
	if (is_move(diff, old->shape, new->shape, &dx, &dy)) {
		char x[32], y[32];
		gp_format_mm_short(x, sizeof(x), dx);
		gp_format_mm_short(y, sizeof(y), dy);
		gp_buffer_printf(&diff->text, "%s %s: moved by %s, %s mm\n",
				 layer, old->name, x, y);
		return;
	}
	double a0 = gp_geos_shape_area_mm2(diff->geos, old->shape);
	double a1 = gp_geos_shape_area_mm2(diff->geos, new->shape);
	gp_buffer_printf(&diff->text,
			 "%s %s: reshaped, area %.6f -> %.6f mm2 (%+.6f)\n",
			 layer, old->name, a0, a1, a1 - a0);
}

static void report_one_side(struct gp_diff *diff, const struct group *g,
			    const char *what, struct gp_polyset *keep)
{
	diff->changes++;
	gp_buffer_printf(&diff->text, "%s %s: %s, area %.6f mm2\n",
			 gp_layer_name(g->layer), g->name, what,
			 gp_geos_shape_area_mm2(diff->geos, g->shape));
	gp_geos_shape_to_polyset(diff->geos, g->shape, keep);
}

static void compare(struct gp_diff *diff, struct group_list *old,
		    struct group_list *new)
{
	for (int layer = 0; layer < GP_LAYER_COUNT; layer++) {
		for (size_t i = 0; i < old->count; i++) {
			struct group *g = &old->items[i];
			if (g->layer != (enum gp_layer)layer)
				continue;
			struct group *n = find_group(new, g->layer, g->name);
			if (n)
				report_change(diff, g, n);
			else
				report_one_side(diff, g, "removed",
						&diff->removed);
		}
		for (size_t i = 0; i < new->count; i++) {
			struct group *g = &new->items[i];
			if (g->layer == (enum gp_layer)layer &&
			    !find_group(old, g->layer, g->name))
				report_one_side(diff, g, "added", &diff->added);
		}
	}
}

GP_EXPORT struct gp_diff *gp_diff_create(const struct gp_build *old,
					 const struct gp_build *new,
					 struct gp_diag *diag)
{
	struct gp_diff *diff = calloc(1, sizeof(*diff));
	if (!diff || !(diff->geos = gp_geos_create(diag))) {
		free(diff);
		gp_diag_oom(diag, NULL);
		return NULL;
	}
	gp_buffer_init(&diff->text);
	gp_polyset_init(&diff->removed);
	gp_polyset_init(&diff->added);
	diff->frame = gp_box_union(
		gp_box_union(old->design->front.box, old->design->back.box),
		gp_box_union(new->design->front.box, new->design->back.box));
	struct group_list a = { 0 }, b = { 0 };
	bool ok = collect(diff->geos, &old->art, &a) &&
		  collect(diff->geos, &new->art, &b);
	if (ok)
		compare(diff, &a, &b);
	free_groups(diff->geos, &a);
	free_groups(diff->geos, &b);
	if (!ok || diff->text.failed) {
		gp_diag_error(diag, NULL, "cannot compare the two builds");
		gp_diff_destroy(diff);
		return NULL;
	}
	if (diff->changes == 0)
		gp_buffer_puts(&diff->text, "no differences\n");
	else
		gp_buffer_printf(&diff->text, "%zu difference%s\n",
				 diff->changes, diff->changes == 1 ? "" : "s");
	return diff;
}

GP_EXPORT void gp_diff_destroy(struct gp_diff *diff)
{
	if (!diff)
		return;
	gp_buffer_finish(&diff->text);
	gp_polyset_finish(&diff->removed);
	gp_polyset_finish(&diff->added);
	gp_geos_destroy(diff->geos);
	free(diff);
}

GP_EXPORT bool gp_diff_identical(const struct gp_diff *diff)
{
	return diff->changes == 0;
}

GP_EXPORT const char *gp_diff_text(const struct gp_diff *diff)
{
	return diff->text.data ? diff->text.data : "";
}

/* --- the picture ------------------------------------------------------ */

static void trace_set(cairo_t *cr, const struct gp_polyset *set)
{
	for (size_t i = 0; i < set->count; i++) {
		const struct gp_polygon *p = &set->items[i];
		for (size_t r = 0; r <= p->hole_count; r++) {
			const struct gp_ring *ring = r ? &p->holes[r - 1]
						       : &p->outer;
			for (size_t k = 0; k < ring->count; k++)
				(k ? cairo_line_to : cairo_move_to)(
					cr, gp_mm(ring->points[k].x),
					-gp_mm(ring->points[k].y));
			cairo_close_path(cr);
		}
	}
}

static cairo_status_t append(void *closure, const unsigned char *data,
			     unsigned int length)
{
	return gp_buffer_append(closure, data, length)
		       ? CAIRO_STATUS_SUCCESS
		       : CAIRO_STATUS_WRITE_ERROR;
}

/* A4 landscape, in points; the glass scaled to fit with a 15 mm margin. */
static void draw_changes(const struct gp_diff *diff, cairo_t *cr)
{
	const double width = 842, height = 595, mm = 72 / 25.4;
	double gw = gp_mm(gp_box_width(diff->frame));
	double gh = gp_mm(gp_box_height(diff->frame));
	double scale = fmin((width - 30 * mm) / gw, (height - 40 * mm) / gh);
	cairo_set_source_rgb(cr, 0, 0, 0);
	cairo_font_face_t *face = gp_proof_text_face();
	if (face) { /* without fonts the drawing has no title */
		cairo_set_font_face(cr, face);
		cairo_set_font_size(cr, 10);
		cairo_move_to(cr, 15 * mm, 12 * mm);
		char title[160];
		snprintf(title, sizeof(title),
			 "Changes: %zu (red: only in the old build, blue: "
			 "only in the new one). Scale %.3g:1",
			 diff->changes, scale / mm);
		cairo_show_text(cr, title);
	}
	cairo_translate(cr, 15 * mm, 20 * mm);
	cairo_scale(cr, scale, scale);
	cairo_translate(cr, -gp_mm(diff->frame.x0), gp_mm(diff->frame.y1));
	cairo_set_fill_rule(cr, CAIRO_FILL_RULE_EVEN_ODD);
	cairo_set_line_width(cr, 0.5 / scale);
	cairo_rectangle(cr, gp_mm(diff->frame.x0), -gp_mm(diff->frame.y1),
			gw, gh);
	cairo_stroke(cr);
	cairo_set_source_rgba(cr, 0.85, 0.1, 0.1, 0.8);
	trace_set(cr, &diff->removed);
	cairo_fill(cr);
	cairo_set_source_rgba(cr, 0.1, 0.25, 0.9, 0.8);
	trace_set(cr, &diff->added);
	cairo_fill(cr);
}

GP_EXPORT bool gp_diff_write_pdf(const struct gp_diff *diff,
				 const char *path, struct gp_diag *diag)
{
	struct gp_buffer pdf;
	gp_buffer_init(&pdf);
	cairo_surface_t *surface = cairo_pdf_surface_create_for_stream(
		append, &pdf, 842, 595);
	cairo_pdf_surface_set_metadata(surface, CAIRO_PDF_METADATA_CREATOR,
				       "glassplot");
	cairo_t *cr = cairo_create(surface);
	draw_changes(diff, cr);
	cairo_destroy(cr);
	cairo_surface_finish(surface);
	bool ok = cairo_surface_status(surface) == CAIRO_STATUS_SUCCESS &&
		  !pdf.failed;
	cairo_surface_destroy(surface);
	/* written whole under a temporary name, then renamed over path */
	struct gp_staged_file file = { NULL, NULL };
	if (!ok)
		gp_diag_error(diag, NULL, "%s: cannot draw the picture of the "
			      "changes", path);
	ok = ok && gp_staged_file_write(&file, path, pdf.data, pdf.size, diag) &&
	     gp_staged_file_commit(&file, diag);
	gp_staged_file_discard(&file);
	gp_buffer_finish(&pdf);
	return ok;
}
