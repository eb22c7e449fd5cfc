/* The routing sections as the description gives them: `ledges`, `leads`,
 * `seal`, `transfers`, `marks`, `pins` and `part_text`, read by
 * route-read.c into design->routing.  The routing itself is in
 * lib/route/route.h. */
#ifndef GP_ROUTE_SPEC_H
#define GP_ROUTE_SPEC_H

#include "artwork.h"
#include "diag.h"
#include "geom.h"
#include "spec.h"

#include <stdbool.h>
#include <stdint.h>

struct gp_design;

/* Sides of the glass, counter-clockwise from the bottom. */
enum gp_side {
	GP_SIDE_BOTTOM,
	GP_SIDE_RIGHT,
	GP_SIDE_TOP,
	GP_SIDE_LEFT,
	GP_SIDE_COUNT
};

const char *gp_side_name(enum gp_side side);

enum gp_ledge_connection {
	GP_LEDGE_ELASTOMERIC, /* conductive elastomer strip ("zebra") */
	GP_LEDGE_PINS,        /* metal pins clipped on the ledge */
	GP_LEDGE_HEAT_SEAL,   /* heat-seal or flex connector */
};

enum gp_carries {
	GP_CARRIES_ALL,
	GP_CARRIES_COMMONS,
	GP_CARRIES_SEGMENTS,
	GP_CARRIES_LISTED,    /* the elements and nets of carries_list */
};

/* Which way dot-matrix commons leave their strips. */
enum gp_commons_exit {
	GP_COMMONS_AUTO,   /* towards a side ledge, else split */
	GP_COMMONS_LEFT,
	GP_COMMONS_RIGHT,
	GP_COMMONS_SPLIT,  /* first half of each block's rows left, rest right */
};

/* One contact ledge: a row of pads along one side of one plate. */
struct gp_ledge {
	const char *name;
	struct gp_where where;
	enum gp_side side;
	enum gp_plate plate;
	bool plate_given;
	enum gp_ledge_connection connection;
	int64_t connector_pitch;  /* conductor, pin or finest pitch; 0 none */
	struct gp_where connection_where;
	int64_t pitch, pad_width, pad_length, edge_clearance;
	bool pin1_given;
	int64_t pin1;             /* centre of pin 1 along the side */
	int direction;            /* +1: numbers grow towards +x (+y) */
	long first_pin;           /* 0: continue after the ledge before */
	enum gp_carries carries;
	const struct gp_node *carries_list; /* names (sequence) when LISTED */
	const struct gp_node *map;/* explicit pin map (sequence) or NULL */
};

struct gp_seal_spec {
	bool given;
	struct gp_where where;
	int64_t width;            /* band width */
	int64_t distance;         /* from the viewing area to the band */
	enum gp_side port_side;
	bool port_side_given;
	bool port_position_given;
	int64_t port_position;    /* centre of the fill port along its side */
	int64_t port_width;
	struct gp_where port_where;
};

struct gp_transfer_spec {
	struct gp_where where;
	int64_t size;             /* diameter of a transfer dot */
	long count;               /* dots per net */
	bool outside;             /* just outside the seal band, not in it */
	int64_t margin;           /* ITO around each dot on both plates */
};

#define GP_MAX_MARKS 8

struct gp_marks_spec {
	bool enabled;
	struct gp_where where;
	int64_t size;             /* arm to arm of the cross */
	int64_t line;             /* width of the cross's bars */
	int64_t gap;              /* clearance between a mark and its partner */
	struct gp_point at[GP_MAX_MARKS];
	size_t count;             /* 0: two marks placed automatically */
};

struct gp_leads_spec {
	struct gp_where where;
	int64_t width;            /* lead width outside the seal */
	int64_t space;            /* least space between leads */
	enum gp_commons_exit commons;
};

struct gp_text_spec {
	bool given;
	struct gp_where where;
	enum gp_plate plate;
	const char *text;         /* NULL: "PART REV" */
	struct gp_point position; /* centre of the text */
	int64_t height;           /* cap height */
	const char *font;
	int rotation;
	bool mirror;
};

#define GP_MAX_LEDGES 8

/* Everything read from the routing sections of a description. */
struct gp_routing {
	struct gp_ledge ledges[GP_MAX_LEDGES];
	size_t ledge_count;
	struct gp_seal_spec seal;
	struct gp_transfer_spec transfers;
	struct gp_marks_spec marks;
	struct gp_leads_spec leads;
	struct gp_text_spec text;
	const struct gp_node *pins;   /* explicit pin map or NULL */
};

/* Reads the sections `ledges`, `leads`, `seal`, `transfers`, `marks`,
 * `pins` and `part_text` from the top-level reader r into
 * design->routing (left NULL when none of them is given).  Errors are
 * recorded; returns false when any was. */
bool gp_routing_read(struct gp_design *design, struct gp_reader *r,
		     struct gp_diag *diag);
void gp_routing_destroy(struct gp_routing *routing);

#endif
