/* The description as a tree of positioned nodes, read from YAML through
 * libyaml's document API, and typed readers that report errors at the
 * node's place.  Every section of the model is read with these helpers. */
#ifndef GP_SPEC_H
#define GP_SPEC_H

#include "diag.h"

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

enum gp_node_kind {
	GP_NODE_SCALAR,
	GP_NODE_SEQUENCE,
	GP_NODE_MAP,
};

struct gp_node {
	enum gp_node_kind kind;
	struct gp_where where;
	char *text;               /* scalar text; NULL otherwise */
	bool quoted;              /* scalar was quoted: never a number */
	/* sequence: items[i]; map: keys[i] -> items[i] (key nodes are scalars) */
	struct gp_node **items;
	struct gp_node **keys;
	size_t count;
};

struct gp_spec {
	char *file;               /* name used in messages */
	struct gp_node *root;     /* a map */
	/* Overrides applied with gp_spec_override, as given, for the summary. */
	char **overrides;
	size_t override_count;
	/* "--set #N" names that grafted nodes point at as their file. */
	char **labels;
	size_t label_count;
	size_t node_count;        /* nodes made so far, overrides included */
};

/* Limits that keep hostile input bounded. */
#define GP_SPEC_MAX_DEPTH 32
#define GP_SPEC_MAX_NODES 200000        /* file and overrides together */
#define GP_SPEC_MAX_BYTES (8 * 1024 * 1024)
#define GP_SPEC_MAX_SCALAR 1024         /* bytes in one value or key */
#define GP_SPEC_MAX_OVERRIDES 256

/* Load from a file or a buffer; name is used in messages.  Returns NULL and
 * records errors on failure. */
struct gp_spec *gp_spec_load_file(const char *path, struct gp_diag *diag);
struct gp_spec *gp_spec_load_buffer(const char *name, const char *data,
				    size_t size, struct gp_diag *diag);
void gp_spec_destroy(struct gp_spec *spec);

/* Apply "a.b.c=value" (number is the 1-based position among --set options,
 * used in messages as "--set #N").  Map keys are followed by name; a
 * sequence index may be given as a number.  The final key may be new only
 * if its parent map exists. */
bool gp_spec_override(struct gp_spec *spec, const char *assignment,
		      int number, struct gp_diag *diag);

/* --- typed reading of a map ------------------------------------------- */

/* A map being read: remembers which keys were asked for, so that
 * gp_reader_end can report unknown keys with the nearest known one. */
struct gp_reader {
	const struct gp_node *map;
	const char *what;         /* "block 'main'", for messages */
	struct gp_diag *diag;
	const char *known[64];
	size_t known_count;
	bool ok;                  /* false once any error was recorded */
};

/* Begin reading node as a map; if it is not a map, records an error and
 * every later read returns "missing". */
void gp_reader_begin(struct gp_reader *reader, const struct gp_node *node,
		     const char *what, struct gp_diag *diag);
/* Reports every key that was never asked for.  Returns reader->ok. */
bool gp_reader_end(struct gp_reader *reader);
/* For the test that keeps glassplot(5) in step with the readers
 * (tests/list-keys.c): when set, gp_reader_end calls observer with every
 * map it ends, whose known keys are all the keys that map may hold.
 * Process-wide and not thread-safe; the library never sets it. */
void gp_reader_observe(void (*observer)(const struct gp_reader *reader,
					void *data),
		       void *data);

/* Each getter declares key as known, and returns the node (or NULL when
 * absent).  If required and absent, records "missing required key". */
const struct gp_node *gp_read_node(struct gp_reader *reader, const char *key,
				   bool required);
/* The getters below leave *out unchanged when the key is absent, so set
 * the default first.  They return false only on an error. */
bool gp_read_length(struct gp_reader *reader, const char *key, bool required,
		    int64_t *out);
/* Length that must be > 0. */
bool gp_read_size(struct gp_reader *reader, const char *key, bool required,
		  int64_t *out);
bool gp_read_pair(struct gp_reader *reader, const char *key, bool required,
		  int64_t out[2]);
/* Pair whose two values must be > 0. */
bool gp_read_size_pair(struct gp_reader *reader, const char *key,
		       bool required, int64_t out[2]);
bool gp_read_int(struct gp_reader *reader, const char *key, bool required,
		 long min, long max, long *out);
bool gp_read_int_pair(struct gp_reader *reader, const char *key,
		      bool required, long min, long max, long out[2]);
bool gp_read_double(struct gp_reader *reader, const char *key, bool required,
		    double min, double max, double *out);
bool gp_read_bool(struct gp_reader *reader, const char *key, bool required,
		  bool *out);
/* Borrowed string (valid while the spec lives). */
bool gp_read_string(struct gp_reader *reader, const char *key, bool required,
		    const char **out);
/* One of choices (NULL-terminated); *out is the index. */
bool gp_read_choice(struct gp_reader *reader, const char *key, bool required,
		    const char *const *choices, int *out);

/* --- reading single nodes --------------------------------------------- */
bool gp_node_length(const struct gp_node *node, struct gp_diag *diag,
		    int64_t *out);
bool gp_node_int(const struct gp_node *node, struct gp_diag *diag, long min,
		 long max, long *out);
bool gp_node_double(const struct gp_node *node, struct gp_diag *diag,
		    double min, double max, double *out);
/* Node must be a sequence of exactly count items (count 0: any). */
bool gp_node_expect_sequence(const struct gp_node *node, size_t count,
			     struct gp_diag *diag);
bool gp_node_expect_map(const struct gp_node *node, struct gp_diag *diag);
bool gp_node_expect_scalar(const struct gp_node *node, struct gp_diag *diag);
const char *gp_node_kind_name(enum gp_node_kind kind);

/* Nearest of candidates to word by edit distance, or NULL when none is
 * close enough to be a plausible typo. */
const char *gp_nearest_word(const char *word, const char *const *candidates,
			    size_t count);

#endif
