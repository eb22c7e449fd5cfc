/* A grid router for single leads (private to the routing).
 *
 * The window is cut into square cells; a lead runs through cell centres
 * along the 8 grid directions, so its segments are straight or at 45
 * degrees.  The caller marks what is in the window, layer by layer:
 *
 *   GP_MAZE_SAME   ITO of other nets on the lead's plate: kept `space`
 *                  away from the lead's edge;
 *   GP_MAZE_OTHER  ITO of the other plate where the lead must not lie
 *                  (inside the seal): kept `other` away (0: only no
 *                  overlap), and `soft_other` preferred;
 *   GP_MAZE_PATCH  back patches of other nets, which are notched where a
 *                  lead crosses them: passable within `patch_reach` of
 *                  the lead's own ITO (a lead must cross the margin ring
 *                  round its own electrode), at a cost; elsewhere like
 *                  GP_MAZE_OTHER;
 *   GP_MAZE_OWN    the lead's own ITO where it starts (sources);
 *   GP_MAZE_TARGET ITO it must reach (targets), or
 *   sides of the window it may end on (gp_maze_rules.side_cost).
 *
 * Distances come from an exact Euclidean distance transform of each
 * layer (Felzenszwalb and Huttenlocher, "Distance Transforms of Sampled
 * Functions", Theory of Computing 8, 2012), less a margin of 2.25 cells
 * for what the grid cannot see (an obstacle's edge may lie 1.5 cells from
 * the centre of the nearest marked cell; a lead between two cell centres
 * 0.71 cells from both).  Cells inside GP_MAZE_OWN and GP_MAZE_TARGET are
 * always free: a lead may run inside its own ITO.
 *
 * Paths are found by A* (octile distances, integer costs) and then pulled
 * straight: runs of cells become the fewest straight and 45-degree
 * segments that stay on free cells.
 *
 * Units: nm, glass frame.  Costs and cells are internal. */
#ifndef GP_MAZE_H
#define GP_MAZE_H

#include "geom.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

enum gp_maze_layer {
	GP_MAZE_SAME,
	GP_MAZE_OTHER,
	GP_MAZE_PATCH,
	GP_MAZE_OWN,
	GP_MAZE_TARGET,
	GP_MAZE_FRAGILE,  /* own or target ITO that notches may cut: a
			   * lead ends end_depth inside it */
	GP_MAZE_SHADOW,   /* where other leads will run: passable at a
			   * high cost within shadow_reach of the lead's
			   * own ITO (or its target), else not */
	GP_MAZE_LAYERS
};

/* Sides of the window, counter-clockwise from the bottom (as enum
 * gp_side). */
#define GP_MAZE_SIDES 4

struct gp_maze_rules {
	int64_t width;            /* lead width */
	int64_t space;            /* to GP_MAZE_SAME */
	int64_t other;            /* to GP_MAZE_OTHER (hard) */
	int64_t soft_other;       /* to GP_MAZE_OTHER and PATCH (preferred) */
	int64_t patch_reach;      /* PATCH passable this near GP_MAZE_OWN */
	int64_t shadow_reach;     /* SHADOW passable this near GP_MAZE_OWN */
	/* side_cost[s] >= 0: the path may end on side s of the window, at
	 * this extra cost (in nm of path); < 0: not on that side.  Ending on
	 * a side needs `side_space` from GP_MAZE_SAME there. */
	int64_t side_cost[GP_MAZE_SIDES];
	int64_t side_space;
	bool to_target;           /* the path may end on GP_MAZE_TARGET */
	/* A path starts and ends this deep inside GP_MAZE_OWN and
	 * GP_MAZE_TARGET (less where they are thinner). */
	int64_t end_depth;
};

struct gp_maze;

/* A grid over window with cells of `cell` nm (at least 1 um); NULL when
 * out of memory or when it would have more than GP_MAZE_MAX_CELLS. */
#define GP_MAZE_MAX_CELLS (3u << 20)
struct gp_maze *gp_maze_create(struct gp_box window, int64_t cell);
/* Whether a grid over window with cells of `cell` can be made at all (a
 * window narrower than two cells has no path through it). */
bool gp_maze_fits(struct gp_box window, int64_t cell);
void gp_maze_destroy(struct gp_maze *maze);
/* The cell size a window of this size needs for leads `fine` apart at
 * the least: fine / 3, coarser when the window would be too large. */
int64_t gp_maze_cell_for(struct gp_box window, int64_t fine);

void gp_maze_mark_polygon(struct gp_maze *maze, enum gp_maze_layer layer,
			  const struct gp_polygon *poly);
void gp_maze_mark_box(struct gp_maze *maze, enum gp_maze_layer layer,
		      struct gp_box box);

/* A found path: points (nm) from the last cell deep in GP_MAZE_OWN it leaves
 * to the first of GP_MAZE_TARGET it reaches (or to the window side it
 * ends on, extended onto that side).  side: the side, or -1 on a
 * target. */
struct gp_maze_path {
	struct gp_point *points;
	size_t count;
	int side;
	struct gp_point end;      /* last point */
};

void gp_maze_path_finish(struct gp_maze_path *path);

/* Routes one lead.  Returns false when out of memory; *found says
 * whether there was a path. */
bool gp_maze_route(struct gp_maze *maze, const struct gp_maze_rules *rules,
		   struct gp_maze_path *out, bool *found);

#endif
