#include "patch.h"

#include "units.h"

#include <stdlib.h>
#include <string.h>

/* Shapes of the work in progress, one per group. */
struct work {
	struct gp_geos *geos;
	size_t n;
	struct gp_geos_shape **front; /* union of the group's front shapes */
	struct gp_geos_shape **grown; /* front + margin box */
	struct gp_geos_shape **patch;
	/* cuts[g] collects what group g must give up */
	struct gp_geos_shape ***cuts;
	size_t *cut_count;
};

static void work_finish(struct work *w)
{
	for (size_t i = 0; i < w->n; i++) {
		if (w->front)
			gp_geos_shape_destroy(w->geos, w->front[i]);
		if (w->grown)
			gp_geos_shape_destroy(w->geos, w->grown[i]);
		if (w->patch)
			gp_geos_shape_destroy(w->geos, w->patch[i]);
		for (size_t k = 0; w->cuts && k < w->cut_count[i]; k++)
			gp_geos_shape_destroy(w->geos, w->cuts[i][k]);
		if (w->cuts)
			free(w->cuts[i]);
	}
	free(w->front);
	free(w->grown);
	free(w->patch);
	free(w->cuts);
	free(w->cut_count);
}

static bool work_init(struct work *w, struct gp_geos *geos, size_t n)
{
	memset(w, 0, sizeof(*w));
	w->geos = geos;
	w->n = n;
	size_t c = n ? n : 1;
	w->front = calloc(c, sizeof(*w->front));
	w->grown = calloc(c, sizeof(*w->grown));
	w->patch = calloc(c, sizeof(*w->patch));
	w->cuts = calloc(c, sizeof(*w->cuts));
	w->cut_count = calloc(c, sizeof(*w->cut_count));
	return w->front && w->grown && w->patch && w->cuts && w->cut_count;
}

/* Union of polygons as one shape. */
static struct gp_geos_shape *union_of(struct gp_geos *geos,
				      const struct gp_polygon *polys,
				      size_t count)
{
	struct gp_geos_shape **parts = calloc(count ? count : 1,
					      sizeof(*parts));
	struct gp_geos_shape *u = NULL;
	size_t made = 0;
	if (!parts)
		return NULL;
	for (; made < count; made++) {
		parts[made] = gp_geos_shape_from_polygon(geos, &polys[made]);
		if (!parts[made])
			goto done;
	}
	u = gp_geos_shape_union(geos, parts, count);
done:
	for (size_t i = 0; i < made; i++)
		gp_geos_shape_destroy(geos, parts[i]);
	free(parts);
	return u;
}

static bool add_cut(struct work *w, size_t g, struct gp_geos_shape *cut)
{
	if (!cut)
		return false;
	struct gp_geos_shape **grown = realloc(
		w->cuts[g], (w->cut_count[g] + 1) * sizeof(*grown));
	if (!grown) {
		gp_geos_shape_destroy(w->geos, cut);
		return false;
	}
	w->cuts[g] = grown;
	w->cuts[g][w->cut_count[g]++] = cut;
	return true;
}

/* Replaces *shape by op(*shape, other), other borrowed. */
static bool replace(struct gp_geos *geos, struct gp_geos_shape **shape,
		    struct gp_geos_shape *result)
{
	if (!result)
		return false;
	gp_geos_shape_destroy(geos, *shape);
	*shape = result;
	return true;
}

/* (a) Where two groups' grown shapes come closer than min_space, each
 * gives up what lies within (d + s) / 2 of the other's front shapes, d
 * being the gap between the front shapes: the split falls in the middle
 * of the gap.  Round cuts are widened by the chord tolerance because
 * GEOS's flattened arcs lie inside the true ones. */
static bool split_neighbours(struct work *w, const struct gp_patch_rules *r,
			     const struct gp_index_pair *pairs,
			     size_t pair_count)
{
	for (size_t k = 0; k < pair_count; k++) {
		size_t g = pairs[k].a, h = pairs[k].b;
		double dg, df;
		if (!gp_geos_shape_distance(w->geos, w->grown[g], w->grown[h],
					    &dg))
			return false;
		if (dg >= (double)r->min_space)
			continue;
		if (!gp_geos_shape_distance(w->geos, w->front[g], w->front[h],
					    &df))
			return false;
		int64_t reach = (int64_t)((df + (double)r->min_space) / 2 + 1) +
				r->chord_tolerance;
		if (!add_cut(w, g,
			     gp_geos_shape_offset(w->geos, w->front[h], reach,
						  GP_JOIN_ROUND,
						  r->chord_tolerance)) ||
		    !add_cut(w, h,
			     gp_geos_shape_offset(w->geos, w->front[g], reach,
						  GP_JOIN_ROUND,
						  r->chord_tolerance)))
			return false;
	}
	return true;
}

/* (b) The zone to keep clear around traces: traces outside every group's
 * front shapes, grown by the clearance.  NULL *zone when there are none. */
static bool notch_zone(struct work *w, const struct gp_polygon *traces,
		       size_t trace_count, const struct gp_patch_rules *r,
		       struct gp_geos_shape **zone)
{
	*zone = NULL;
	if (trace_count == 0)
		return true;
	struct gp_geos_shape *t = union_of(w->geos, traces, trace_count);
	struct gp_geos_shape *fronts = gp_geos_shape_union(w->geos, w->front,
							   w->n);
	struct gp_geos_shape *outside = NULL;
	bool ok = false;
	if (!t || !fronts)
		goto done;
	outside = gp_geos_shape_difference(w->geos, t, fronts);
	if (!outside)
		goto done;
	if (r->clearance_box)
		*zone = gp_geos_shape_dilate_box(w->geos, outside, r->clearance,
						 r->clearance);
	else
		*zone = gp_geos_shape_offset(w->geos, outside,
					     r->clearance + r->chord_tolerance,
					     GP_JOIN_ROUND, r->chord_tolerance);
	ok = *zone != NULL;
done:
	gp_geos_shape_destroy(w->geos, t);
	gp_geos_shape_destroy(w->geos, fronts);
	gp_geos_shape_destroy(w->geos, outside);
	return ok;
}

/* patch = grown - (cuts + notch zone) + front */
static bool cut_patch(struct work *w, size_t g, struct gp_geos_shape *zone)
{
	/* only the zone over this group's patch matters: clipping it to the
	 * patch's bounds keeps the work per group independent of the
	 * number of groups (a hostile description can have thousands) */
	if (zone) {
		struct gp_geos_shape *box = gp_geos_shape_from_box(
			w->geos, gp_geos_shape_bounds(w->grown[g]));
		struct gp_geos_shape *near =
			box ? gp_geos_shape_intersection(w->geos, zone, box)
			    : NULL;
		gp_geos_shape_destroy(w->geos, box);
		if (!add_cut(w, g, near))
			return false;
	}
	struct gp_geos_shape *p = gp_geos_shape_clone(w->geos, w->grown[g]);
	if (!p)
		return false;
	w->patch[g] = p;
	if (w->cut_count[g] > 0) {
		struct gp_geos_shape *cut =
			gp_geos_shape_union(w->geos, w->cuts[g],
					    w->cut_count[g]);
		if (!cut)
			return false;
		bool ok = replace(w->geos, &w->patch[g],
				  gp_geos_shape_difference(w->geos,
							   w->patch[g], cut));
		gp_geos_shape_destroy(w->geos, cut);
		if (!ok)
			return false;
	}
	struct gp_geos_shape *both[2] = { w->patch[g], w->front[g] };
	return replace(w->geos, &w->patch[g],
		       gp_geos_shape_union(w->geos, both, 2));
}

static void warn_close(struct work *w, const struct gp_patch_group *groups,
		       size_t g, size_t h, double d, int64_t limit,
		       struct gp_diag *diag)
{
	struct gp_point pa = { 0, 0 }, pb = { 0, 0 };
	gp_geos_shape_nearest(w->geos, w->patch[g], w->patch[h], &pa, &pb);
	char x[32], y[32], dd[32], ll[32];
	gp_format_mm_short(x, sizeof(x), (pa.x + pb.x) / 2);
	gp_format_mm_short(y, sizeof(y), (pa.y + pb.y) / 2);
	gp_format_mm_short(dd, sizeof(dd), (int64_t)d);
	gp_format_mm_short(ll, sizeof(ll), limit);
	gp_diag_warn(diag, GP_MSG_TOO_CLOSE, NULL,
		     "back patches of %s and %s are %s mm apart at "
		     "(%s, %s) mm, less than the %s mm minimum space: their "
		     "front shapes are too close",
		     groups[g].name ? groups[g].name : "?",
		     groups[h].name ? groups[h].name : "?", dd, x, y, ll);
}

/* Whatever the split left too close (ends of gaps, odd angles) goes from
 * the later group; what the front shapes force is reported. */
static bool settle_pairs(struct work *w, const struct gp_patch_group *groups,
			 const struct gp_patch_rules *r,
			 const struct gp_index_pair *pairs, size_t pair_count,
			 struct gp_diag *diag)
{
	for (size_t k = 0; k < pair_count; k++) {
		size_t g = pairs[k].a, h = pairs[k].b;
		double d;
		if (!gp_geos_shape_distance(w->geos, w->patch[g], w->patch[h],
					    &d))
			return false;
		if (d >= (double)r->min_space)
			continue;
		struct gp_geos_shape *keep_out = gp_geos_shape_offset(
			w->geos, w->patch[g], r->min_space + r->chord_tolerance,
			GP_JOIN_ROUND, r->chord_tolerance);
		if (!keep_out ||
		    !replace(w->geos, &w->patch[h],
			     gp_geos_shape_difference(w->geos, w->patch[h],
						      keep_out))) {
			gp_geos_shape_destroy(w->geos, keep_out);
			return false;
		}
		gp_geos_shape_destroy(w->geos, keep_out);
		struct gp_geos_shape *both[2] = { w->patch[h], w->front[h] };
		if (!replace(w->geos, &w->patch[h],
			     gp_geos_shape_union(w->geos, both, 2)) ||
		    !gp_geos_shape_distance(w->geos, w->patch[g], w->patch[h],
					    &d))
			return false;
		if (d < (double)r->min_space)
			warn_close(w, groups, g, h, d, r->min_space, diag);
	}
	return true;
}

bool gp_patch_make(struct gp_geos *geos, const struct gp_patch_group *groups,
		   size_t group_count, const struct gp_polygon *traces,
		   size_t trace_count, const struct gp_patch_rules *rules,
		   struct gp_polyset *patches, struct gp_diag *diag)
{
	struct work w;
	struct gp_box *bounds = NULL;
	struct gp_index_pair *pairs = NULL;
	size_t pair_count = 0;
	struct gp_geos_shape *zone = NULL;
	bool ok = false;
	if (!work_init(&w, geos, group_count))
		goto done;
	bounds = calloc(group_count ? group_count : 1, sizeof(*bounds));
	if (!bounds)
		goto done;
	for (size_t g = 0; g < group_count; g++) {
		w.front[g] = union_of(geos, groups[g].front,
				      groups[g].front_count);
		if (!w.front[g])
			goto done;
		w.grown[g] = gp_geos_shape_dilate_box(geos, w.front[g],
						      rules->margin,
						      rules->margin);
		if (!w.grown[g])
			goto done;
		bounds[g] = gp_geos_shape_bounds(w.grown[g]);
	}
	if (!gp_geos_box_pairs(geos, bounds, group_count, rules->min_space,
			       &pairs, &pair_count) ||
	    !split_neighbours(&w, rules, pairs, pair_count) ||
	    !notch_zone(&w, traces, trace_count, rules, &zone))
		goto done;
	for (size_t g = 0; g < group_count; g++)
		if (!cut_patch(&w, g, zone))
			goto done;
	if (!settle_pairs(&w, groups, rules, pairs, pair_count, diag))
		goto done;
	size_t g = 0;
	for (; g < group_count; g++)
		if (!gp_geos_shape_to_polyset(geos, w.patch[g], &patches[g]))
			break;
	ok = g == group_count;
done:
	gp_geos_shape_destroy(geos, zone);
	free(pairs);
	free(bounds);
	work_finish(&w);
	return ok;
}

bool gp_patch_registration_shapes(struct gp_geos *geos,
				  const struct gp_geos_shape *front,
				  const struct gp_geos_shape *back,
				  int64_t shift_x, int64_t shift_y,
				  struct gp_registration *out)
{
	memset(out, 0, sizeof(*out));
	out->front_mm2 = gp_geos_shape_area_mm2(geos, front);
	out->worst = -1;
	for (int k = 0; k < GP_REGISTRATION_SHIFTS; k++) {
		struct gp_geos_shape *moved = gp_geos_shape_translate(
			geos, back, (k % 3 - 1) * shift_x,
			(k / 3 - 1) * shift_y);
		struct gp_geos_shape *lit =
			moved ? gp_geos_shape_intersection(geos, front, moved)
			      : NULL;
		gp_geos_shape_destroy(geos, moved);
		if (!lit)
			return false;
		out->lit_mm2[k] = gp_geos_shape_area_mm2(geos, lit);
		gp_geos_shape_destroy(geos, lit);
		if (out->worst < 0 || out->lit_mm2[k] < out->worst_mm2) {
			out->worst = k;
			out->worst_mm2 = out->lit_mm2[k];
		}
	}
	return true;
}

bool gp_patch_registration(struct gp_geos *geos,
			   const struct gp_polyset *front,
			   const struct gp_polyset *back, int64_t shift_x,
			   int64_t shift_y, struct gp_registration *out)
{
	struct gp_geos_shape *f = gp_geos_shape_from_polyset(geos, front);
	struct gp_geos_shape *b = gp_geos_shape_from_polyset(geos, back);
	struct gp_geos_shape *fu = f ? gp_geos_shape_union(geos, &f, 1) : NULL;
	struct gp_geos_shape *bu = b ? gp_geos_shape_union(geos, &b, 1) : NULL;
	bool ok = fu && bu &&
		  gp_patch_registration_shapes(geos, fu, bu, shift_x, shift_y,
					       out);
	gp_geos_shape_destroy(geos, f);
	gp_geos_shape_destroy(geos, b);
	gp_geos_shape_destroy(geos, fu);
	gp_geos_shape_destroy(geos, bu);
	return ok;
}
