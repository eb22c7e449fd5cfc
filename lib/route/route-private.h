/* Private to the routing (route.c, ledge.c): the routing state, frames
 * and small helpers.  Units: nm, glass frame unless said "canonical" (the
 * frame turned so that the ledge being routed is at the bottom). */
#ifndef GP_ROUTE_PRIVATE_H
#define GP_ROUTE_PRIVATE_H

#include "digits.h"
#include "stage.h"
#include "geos.h"
#include "route.h"
#include "units.h"

#include <stdbool.h>
#include <stdint.h>

#define PI 3.14159265358979323846
#define SQRT2 1.41421356237309504880

/* --- frames ---------------------------------------------------------------- */

static inline struct gp_point to_canon(enum gp_side ledge, struct gp_point p)
{
	switch (ledge) {
	case GP_SIDE_TOP: return (struct gp_point){ -p.x, -p.y };
	case GP_SIDE_LEFT: return (struct gp_point){ -p.y, p.x };
	case GP_SIDE_RIGHT: return (struct gp_point){ p.y, -p.x };
	default: return p;
	}
}

static inline struct gp_point from_canon(enum gp_side ledge, struct gp_point p)
{
	switch (ledge) {
	case GP_SIDE_TOP: return (struct gp_point){ -p.x, -p.y };
	case GP_SIDE_LEFT: return (struct gp_point){ p.y, -p.x };
	case GP_SIDE_RIGHT: return (struct gp_point){ -p.y, p.x };
	default: return p;
	}
}

static inline struct gp_box box_map(struct gp_box b, enum gp_side ledge, bool in)
{
	struct gp_point a = { b.x0, b.y0 }, c = { b.x1, b.y1 };
	a = in ? to_canon(ledge, a) : from_canon(ledge, a);
	c = in ? to_canon(ledge, c) : from_canon(ledge, c);
	return gp_box_make(a.x < c.x ? a.x : c.x, a.y < c.y ? a.y : c.y,
			   a.x > c.x ? a.x : c.x, a.y > c.y ? a.y : c.y);
}

static inline enum gp_side side_to_canon(enum gp_side ledge, enum gp_side s)
{
	return (enum gp_side)((s - ledge + GP_SIDE_COUNT) % GP_SIDE_COUNT);
}

static inline enum gp_side side_from_canon(enum gp_side ledge, enum gp_side s)
{
	return (enum gp_side)((s + ledge) % GP_SIDE_COUNT);
}

static inline const char *mm(char *buf, int64_t nm)
{
	gp_format_mm_short(buf, 32, nm);
	return buf;
}

static inline int64_t max64(int64_t a, int64_t b) { return a > b ? a : b; }
static inline int64_t min64(int64_t a, int64_t b) { return a < b ? a : b; }

/* --- the routing state ------------------------------------------------------- */

struct cand {
	enum gp_side side;
	struct gp_point at;
	int64_t width;
	/* how far the lead reaches back into its electrode past at: into a
	 * back patch, deep enough that no notch cuts it off */
	int64_t reach;
	/* a block common's end that leaves its strip sideways and turns
	 * toward the ledge (route.c, turning_cands): the sideways stub */
	bool turn;
	struct gp_box turn_stub;
};

struct netstate {
	int ledge;                /* -1: not routed */
	/* every end the net may leave from, and per end: */
	struct cand *cands;
	int cand_count, cand_capacity;
	int chosen;
	int *order;               /* free candidates, best first */
	int usable, pick;
	int first_hit;            /* what blocked the best one */
	bool first_hit_plate;
	bool has_pad;             /* explicit map: pad known before routing */
	int pin;                  /* index into build->pins, -1 */
	bool transfer;
	struct gp_box corridor;   /* electrode plate, real frame */
	struct gp_box centre;     /* bounds of the net's electrodes */
	int64_t ext;              /* narrow lead starts this far past the seal */
	bool *bend;               /* cands whose way to the seal is not
				   * straight but can go round (route-bundle.c) */
	bool bundle;              /* leaves toward its ledge (route-bundle.c) */
	bool no_bend;             /* going round failed: leave straight */
	bool *banned;             /* cands that failed going round */
	bool decided;             /* corridor (and path) final */
	struct gp_point *path;    /* a bundle lead inside the seal, to c->at */
	size_t path_count;
	int64_t path_width;
	struct gp_polygon path_poly;  /* its outline */
	bool block_common;
	bool patch;               /* has back patches */
	int block_row;            /* row within its block, for the split */
	int block_rows;
};

struct route {
	struct gp_build *build;
	const struct gp_design *design;
	const struct gp_routing *g;
	struct gp_ledge *ledges;  /* build->ledges: resolved copies */
	struct gp_diag *diag;
	struct gp_box s_in, s_out;
	struct netstate *nets;
	size_t net_count;
	int64_t space;            /* leads.space */
	int64_t min_space;        /* rules.min_space */
	size_t pin_first[GP_MAX_LEDGES];  /* first pad of each ledge */
	bool turning;             /* turning ends may be chosen */
};

static inline const char *net_name(const struct route *r, int net)
{
	return net >= 0 ? r->build->art.nets[net].name : "NC";
}

/* route.c: the description's place of a net's element, or NULL. */
const struct gp_where *gp_route_net_where(const struct route *r, int net);

/* Plate box and the other plate's box. */
static inline struct gp_box plate_box(const struct gp_design *d, enum gp_plate p)
{
	return p == GP_PLATE_FRONT ? d->front.box : d->back.box;
}

static inline int64_t box_edge(struct gp_box b, enum gp_side s)
{
	switch (s) {
	case GP_SIDE_BOTTOM: return b.y0;
	case GP_SIDE_TOP: return b.y1;
	case GP_SIDE_LEFT: return b.x0;
	default: return b.x1;
	}
}

/* ledge.c: the outline of a path of straight and 45-degree segments of
 * width w (mitred corners), appended to poly's outer ring. */
bool gp_route_path_polygon(const struct gp_point *p, size_t n, int64_t w,
			   struct gp_polygon *poly);
/* route.c: cuts a back patch (shape index) back from a lead of another
 * net by what a plate shift can bring them together; the patch must stay
 * one piece. */
bool gp_route_notch(struct route *r, struct gp_geos *geos, size_t shape,
		    const struct gp_polygon *lead, int lead_net);
/* route-join.c: joins the pieces of every net that is in several on its
 * plate, inside the seal. */
bool gp_route_join(struct route *r, struct gp_geos *geos);

/* route.c: the straight lead from c towards its side, across the seal
 * and ext beyond it; and the width a lead from c has outside the
 * electrode. */
struct gp_box gp_route_corridor(const struct route *r, const struct cand *c,
				int64_t ext);
int64_t gp_route_lead_width(const struct route *r, const struct netstate *n,
			    const struct cand *c);
/* route-bundle.c: the leads toward ledge index that leave toward it,
 * round what is in their way; sets their paths and the cands where they
 * cross the seal. */
bool gp_route_bundle(struct route *r, int index, int *culprit);

/* ledge.c: nets onto ledges and pads (explicit map or automatic). */
bool gp_route_assign_nets(struct route *r);
/* ledge.c: order, pads, tracks round the seal and fan-out of one ledge. */
bool gp_route_ledge(struct route *r, int index);

#endif
