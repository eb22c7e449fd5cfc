/* Routing: lead-outs from the electrodes to pads on the contact ledge(s),
 * common transfers, the seal with its fill port, the cut outlines, the
 * alignment marks, and the pin table and firmware map written from them.
 *
 * Units: int64_t nanometres in the glass frame (x right, y up).
 *
 * How electrodes ask for a lead.  Any layout stage (blocks, digits, icons)
 * says where each of its nets may be led out with gp_build_add_lead_end():
 * a point on the electrode's edge, the side of the glass the lead leaves
 * towards (straight, perpendicular to that side) and the widest lead the
 * electrode takes there.  A net may offer several ends; the router takes
 * one: the one towards its ledge when it can, otherwise the first that is
 * not blocked, in the order they were added.  Dot-matrix blocks need not
 * add ends: the router knows their strips (segments end top and bottom,
 * commons left and right).
 *
 * Inside the seal a lead runs straight from its end to the seal and across
 * the seal band on the electrode's own plate, so it never crosses the other
 * plate's electrodes; a net whose pads are on the other plate changes
 * plates through common-transfer dots in (or just outside) the seal band.
 * Outside the seal leads run on the ledge's plate in concentric tracks
 * around the seal and fan out to the pads with straight and 45-degree
 * segments.  The pad order follows the order in which the leads leave the
 * seal, walking round it from the side opposite the ledge, so the routing
 * is planar by construction. */
#ifndef GP_ROUTE_H
#define GP_ROUTE_H

#include "artwork.h"
#include "buffer.h"
#include "diag.h"
#include "geom.h"
#include "output.h"
#include "spec.h"

#include <stdbool.h>
#include <stdint.h>

struct gp_build;
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

/* A place where a net's electrode may be led out. */
struct gp_lead_end {
	int net;
	enum gp_side side;        /* the lead leaves towards this side */
	struct gp_point at;       /* centre of the lead on the electrode edge */
	int64_t width;            /* widest lead the electrode takes there */
};

/* Offers an end for net (see above).  False when out of memory. */
bool gp_build_add_lead_end(struct gp_build *build, int net,
			   enum gp_side side, struct gp_point at,
			   int64_t width);

/* A pad on a ledge. */
struct gp_pin {
	int number;
	int ledge;                /* index into build->ledges */
	struct gp_point centre;
	struct gp_box box;        /* the pad */
	int net;                  /* net index, or GP_NET_NONE */
};

/* Routes every net to a pad and adds the seal, transfers and marks.  Does
 * nothing when the description has no ledge (the seal and marks are still
 * drawn when given).  Errors name the nets, the place and the room. */
bool gp_route_layout(struct gp_build *build, struct gp_diag *diag);

/* Adds pins.csv and the firmware map header to set when the build has
 * pins. */
bool gp_route_write(const struct gp_build *build, struct gp_output_set *set,
		    struct gp_diag *diag);

/* The two tables on their own (for the tests). */
bool gp_pins_csv(const struct gp_build *build, struct gp_buffer *out);
bool gp_firmware_header(const struct gp_build *build, struct gp_buffer *out);

struct gp_geos;

/* The seal band (with its fill port), alignment marks and part text, for
 * the seal boxes in and out.  Called by gp_route_layout. */
bool gp_seal_layout(struct gp_build *build, const struct gp_box *in,
		    const struct gp_box *out, struct gp_geos *geos,
		    struct gp_diag *diag);

/* Seal band boxes (inner edge and outer edge) of a design with a seal. */
void gp_seal_boxes(const struct gp_design *design, struct gp_box *inner,
		   struct gp_box *outer);
/* The fill port along its side of the seal: from *a to *b, on a side that
 * runs from *lo to *hi inside the seal (nm). */
void gp_seal_port_span(const struct gp_design *design, int64_t *a,
		       int64_t *b, int64_t *lo, int64_t *hi);

#endif
