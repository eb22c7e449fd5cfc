#include "spec.h"

#include "escape.h"

#include "units.h"

#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <yaml.h>

/* --- tree ---------------------------------------------------------------- */

static void node_destroy(struct gp_node *node)
{
	if (!node)
		return;
	for (size_t i = 0; i < node->count; i++) {
		node_destroy(node->items[i]);
		if (node->keys)
			node_destroy(node->keys[i]);
	}
	free(node->items);
	free(node->keys);
	free(node->text);
	free(node);
}

struct convert {
	yaml_document_t *document;
	const char *file;
	struct gp_diag *diag;
	size_t nodes;
	bool flat;            /* overrides: no line/col */
};

static struct gp_where where_of(const struct convert *c, yaml_mark_t mark)
{
	if (c->flat)
		return (struct gp_where){ c->file, 0, 0 };
	return (struct gp_where){ c->file, (int)mark.line + 1,
				  (int)mark.column + 1 };
}

static struct gp_node *convert_node(struct convert *c, yaml_node_t *ynode,
				    int depth);

static bool convert_children(struct convert *c, struct gp_node *node,
			     yaml_node_t *ynode, int depth)
{
	size_t count = ynode->type == YAML_SEQUENCE_NODE
			       ? (size_t)(ynode->data.sequence.items.top -
					  ynode->data.sequence.items.start)
			       : (size_t)(ynode->data.mapping.pairs.top -
					  ynode->data.mapping.pairs.start);
	node->items = calloc(count ? count : 1, sizeof(*node->items));
	if (ynode->type == YAML_MAPPING_NODE)
		node->keys = calloc(count ? count : 1, sizeof(*node->keys));
	if (!node->items || (ynode->type == YAML_MAPPING_NODE && !node->keys))
		return gp_diag_oom(c->diag, &node->where);
	for (size_t i = 0; i < count; i++) {
		yaml_node_t *value, *key = NULL;
		if (ynode->type == YAML_SEQUENCE_NODE) {
			value = yaml_document_get_node(
				c->document, ynode->data.sequence.items.start[i]);
		} else {
			yaml_node_pair_t *pair =
				&ynode->data.mapping.pairs.start[i];
			key = yaml_document_get_node(c->document, pair->key);
			value = yaml_document_get_node(c->document, pair->value);
		}
		if (key) {
			node->keys[i] = convert_node(c, key, depth + 1);
			if (!node->keys[i]) {
				node->count = i;
				return false;
			}
		}
		node->items[i] = convert_node(c, value, depth + 1);
		node->count = i + 1;
		if (!node->items[i])
			return false;
	}
	return true;
}

static bool check_map_keys(struct convert *c, struct gp_node *node)
{
	for (size_t i = 0; i < node->count; i++) {
		struct gp_node *key = node->keys[i];
		if (key->kind != GP_NODE_SCALAR)
			return gp_diag_fail(c->diag, GP_MSG_KEY_NOT_WORD,
					    &key->where,
					    "a key must be a plain word, not "
					    "a %s",
					    gp_node_kind_name(key->kind));
		for (size_t j = 0; j < i; j++)
			if (strcmp(node->keys[j]->text, key->text) == 0)
				return gp_diag_fail(
					c->diag, GP_MSG_DUPLICATE_KEY,
					&key->where,
					"duplicate key '%s' (first given at "
					"line %d); each key may appear once",
					key->text, node->keys[j]->where.line);
	}
	return true;
}

/* Control characters (a YAML escape such as "\e" or "\x07" makes them)
 * would reach the terminal, a CSV field, a Gerber string or a C comment
 * raw: refused, as is text that is not UTF-8 (libyaml checks its input;
 * this also covers "--set" values). */
static bool printable(const char *text, const struct gp_where *where,
		      struct gp_diag *diag)
{
	for (const char *p = text; *p;) {
		uint32_t cp;
		size_t n = gp_utf8_next(p, &cp);
		if (n == 1 && cp >= 0x80)
			return gp_diag_fail(diag, GP_MSG_NOT_UTF8, where,
					    "a value holds the byte 0x%02X "
					    "at byte %zu, which is not UTF-8",
					    (unsigned)cp,
					    (size_t)(p - text) + 1);
		if (gp_is_control(cp))
			return gp_diag_fail(
				diag, GP_MSG_CONTROL_CHARACTER, where,
				"a value holds the control "
				"character U+%04X at byte %zu; "
				"names and texts take printable "
				"characters only",
				(unsigned)cp, (size_t)(p - text) + 1);
		p += n;
	}
	return true;
}

static struct gp_node *convert_node(struct convert *c, yaml_node_t *ynode,
				    int depth)
{
	if (!ynode)
		return NULL;
	struct gp_where where = where_of(c, ynode->start_mark);
	if (depth > GP_SPEC_MAX_DEPTH) {
		gp_diag_fail(c->diag, GP_MSG_TOO_DEEP, &where,
			     "nesting deeper than %d levels; the description "
			     "format never needs that much",
			     GP_SPEC_MAX_DEPTH);
		return NULL;
	}
	if (++c->nodes > GP_SPEC_MAX_NODES) {
		gp_diag_fail(c->diag, GP_MSG_TOO_MANY_VALUES, &where,
			     "more than %d values (aliases count each time "
			     "they are used); the description is too large",
			     GP_SPEC_MAX_NODES);
		return NULL;
	}
	struct gp_node *node = calloc(1, sizeof(*node));
	if (!node) {
		gp_diag_oom(c->diag, &where);
		return NULL;
	}
	node->where = where;
	bool ok = true;
	switch (ynode->type) {
	case YAML_SCALAR_NODE:
		node->kind = GP_NODE_SCALAR;
		node->quoted = ynode->data.scalar.style !=
			       YAML_PLAIN_SCALAR_STYLE;
		node->text = strndup((const char *)ynode->data.scalar.value,
				     ynode->data.scalar.length);
		if (!node->text)
			ok = gp_diag_oom(c->diag, &where);
		else if (strlen(node->text) != ynode->data.scalar.length)
			ok = gp_diag_fail(c->diag, GP_MSG_CONTROL_CHARACTER,
					  &where,
					  "a value contains a NUL character");
		else if (!printable(node->text, &where, c->diag))
			ok = false;
		else if (ynode->data.scalar.length > GP_SPEC_MAX_SCALAR)
			ok = gp_diag_fail(
				c->diag, GP_MSG_VALUE_TOO_LONG, &where,
				"a value is %zu bytes long; the "
				"limit is %d",
				ynode->data.scalar.length, GP_SPEC_MAX_SCALAR);
		break;
	case YAML_SEQUENCE_NODE:
		node->kind = GP_NODE_SEQUENCE;
		ok = convert_children(c, node, ynode, depth);
		break;
	case YAML_MAPPING_NODE:
		node->kind = GP_NODE_MAP;
		ok = convert_children(c, node, ynode, depth) &&
		     check_map_keys(c, node);
		break;
	default:
		ok = gp_diag_fail(c->diag, GP_MSG_EMPTY_NODE, &where,
				  "empty YAML node");
		break;
	}
	if (!ok) {
		node_destroy(node);
		return NULL;
	}
	return node;
}

/* Line and column of a byte offset (libyaml gives only the offset for
 * encoding errors); columns count bytes. */
static struct gp_where where_of_offset(const char *file, const char *data,
				       size_t size, size_t offset)
{
	struct gp_where where = { file, 1, 1 };
	for (size_t i = 0; i < offset && i < size; i++) {
		if (data[i] == '\n') {
			where.line++;
			where.col = 1;
		} else {
			where.col++;
		}
	}
	return where;
}

static void yaml_error(const yaml_parser_t *parser, const char *file,
		       const char *data, size_t size, bool flat,
		       struct gp_diag *diag)
{
	struct gp_where where = { file, (int)parser->problem_mark.line + 1,
				  (int)parser->problem_mark.column + 1 };
	if (parser->error == YAML_READER_ERROR)
		where = where_of_offset(file, data, size,
					parser->problem_offset);
	if (flat) /* an override's value: no lines of its own */
		where.line = where.col = 0;
	const char *problem = parser->problem ? parser->problem : "unknown";
	if (parser->error == YAML_READER_ERROR && parser->problem_value >= 0)
		gp_diag_fail(diag, GP_MSG_BAD_YAML, &where,
			     "bad YAML: %s (byte 0x%02x); "
			     "expected UTF-8 text",
			     problem, (unsigned)parser->problem_value & 0xff);
	else if (parser->context)
		gp_diag_fail(diag, GP_MSG_BAD_YAML, &where, "bad YAML: %s %s",
			     problem, parser->context);
	else
		gp_diag_fail(diag, GP_MSG_BAD_YAML, &where, "bad YAML: %s",
			     problem);
}

/* A second document would be silently ignored: refuse it. */
static bool single_document(yaml_parser_t *parser, const char *file,
			    const char *data, size_t size, bool flat,
			    struct gp_diag *diag)
{
	yaml_document_t next;
	if (!yaml_parser_load(parser, &next)) {
		yaml_error(parser, file, data, size, flat, diag);
		return false;
	}
	yaml_node_t *root = yaml_document_get_root_node(&next);
	struct gp_where where = { file, 0, 0 };
	if (root && !flat) {
		where.line = (int)next.start_mark.line + 1;
		where.col = (int)next.start_mark.column + 1;
	}
	yaml_document_delete(&next);
	if (root)
		return gp_diag_fail(diag, GP_MSG_SECOND_DOCUMENT, &where,
				    "a second YAML document starts here; a "
				    "description is one document");
	return true;
}

static struct gp_where where_of_mark(const char *file, bool flat,
				     yaml_mark_t mark)
{
	if (flat)
		return (struct gp_where){ file, 0, 0 };
	return (struct gp_where){ file, (int)mark.line + 1,
				  (int)mark.column + 1 };
}

/* Events that end the pre-scan: too deep a node or a tag.  Returns false
 * after recording the error. */
static bool check_event(const yaml_event_t *event, int level,
			const char *file, bool flat, struct gp_diag *diag)
{
	const yaml_char_t *tag = NULL;
	switch (event->type) {
	case YAML_SCALAR_EVENT:
		tag = event->data.scalar.tag;
		break;
	case YAML_SEQUENCE_START_EVENT:
		tag = event->data.sequence_start.tag;
		break;
	case YAML_MAPPING_START_EVENT:
		tag = event->data.mapping_start.tag;
		break;
	case YAML_ALIAS_EVENT:
		break;
	default:
		return true;
	}
	struct gp_where where = where_of_mark(file, flat, event->start_mark);
	if (level > GP_SPEC_MAX_DEPTH)
		return gp_diag_fail(diag, GP_MSG_TOO_DEEP, &where,
				    "nesting deeper than %d levels; the "
				    "description format never needs that "
				    "much",
				    GP_SPEC_MAX_DEPTH);
	static const char core[] = "tag:yaml.org,2002:";
	if (tag && strncmp((const char *)tag, core, strlen(core)) == 0)
		return gp_diag_fail(diag, GP_MSG_YAML_TAG, &where,
				    "YAML tag '!!%.64s' given; the description "
				    "format has no tags: remove it",
				    (const char *)tag + strlen(core));
	if (tag)
		return gp_diag_fail(diag, GP_MSG_YAML_TAG, &where,
				    "YAML tag '%.64s' given; the description "
				    "format has no tags: remove it",
				    (const char *)tag);
	return true;
}

/* libyaml's document loader takes time quadratic in the nesting depth
 * and reads the whole document first, so the depth (and tags, which the
 * loader would drop silently) are checked on the event stream, which
 * stops at the first offending node. */
static bool prescan(const char *file, const char *data, size_t size,
		    bool flat, struct gp_diag *diag)
{
	yaml_parser_t parser;
	if (!yaml_parser_initialize(&parser)) {
		gp_diag_oom(diag, &(struct gp_where){ file, 0, 0 });
		return false;
	}
	yaml_parser_set_input_string(&parser, (const unsigned char *)data,
				     size);
	bool ok = true;
	int level = 0;
	for (bool done = false; ok && !done;) {
		yaml_event_t event;
		if (!yaml_parser_parse(&parser, &event)) {
			yaml_error(&parser, file, data, size, flat, diag);
			ok = false;
			break;
		}
		ok = check_event(&event, level, file, flat, diag);
		if (event.type == YAML_SEQUENCE_START_EVENT ||
		    event.type == YAML_MAPPING_START_EVENT)
			level++;
		else if (event.type == YAML_SEQUENCE_END_EVENT ||
			 event.type == YAML_MAPPING_END_EVENT)
			level--;
		done = event.type == YAML_STREAM_END_EVENT;
		yaml_event_delete(&event);
	}
	yaml_parser_delete(&parser);
	return ok;
}

/* Parse one YAML document into a tree; flat drops line/col (overrides).
 * *nodes counts the nodes made, across calls, against the limit. */
static struct gp_node *parse_tree(const char *file, const char *data,
				  size_t size, bool flat, size_t *nodes,
				  struct gp_diag *diag)
{
	yaml_parser_t parser;
	yaml_document_t document;
	struct gp_node *root = NULL;
	if (!prescan(file, data, size, flat, diag))
		return NULL;
	if (!yaml_parser_initialize(&parser)) {
		gp_diag_oom(diag, &(struct gp_where){ file, 0, 0 });
		return NULL;
	}
	yaml_parser_set_input_string(&parser, (const unsigned char *)data,
				     size);
	if (!yaml_parser_load(&parser, &document)) {
		yaml_error(&parser, file, data, size, flat, diag);
		yaml_parser_delete(&parser);
		return NULL;
	}
	yaml_node_t *top = yaml_document_get_root_node(&document);
	if (top && !single_document(&parser, file, data, size, flat, diag)) {
		yaml_document_delete(&document);
		yaml_parser_delete(&parser);
		return NULL;
	}
	struct convert c = { &document, file, diag, *nodes, flat };
	if (top)
		root = convert_node(&c, top, 0);
	else
		gp_diag_fail(diag, GP_MSG_EMPTY_DESCRIPTION,
			     &(struct gp_where){file, 1, 1},
			     "the description is empty; expected a map of "
			     "sections such as 'front', 'back' and 'blocks'");
	*nodes = c.nodes;
	yaml_document_delete(&document);
	yaml_parser_delete(&parser);
	return root;
}

struct gp_spec *gp_spec_load_buffer(const char *name, const char *data,
				    size_t size, struct gp_diag *diag)
{
	if (size > GP_SPEC_MAX_BYTES) {
		gp_diag_fail(diag, GP_MSG_FILE_TOO_LARGE, NULL,
			     "%s: the description is larger than %d bytes",
			     name, GP_SPEC_MAX_BYTES);
		return NULL;
	}
	struct gp_spec *spec = calloc(1, sizeof(*spec));
	if (!spec || !(spec->file = strdup(name))) {
		free(spec);
		gp_diag_oom(diag, &(struct gp_where){ name, 0, 0 });
		return NULL;
	}
	spec->root = parse_tree(spec->file, data, size, false,
				&spec->node_count, diag);
	if (spec->root && spec->root->kind != GP_NODE_MAP) {
		gp_diag_fail(diag, GP_MSG_NOT_A_MAP, &spec->root->where,
			     "the description must be a map of sections "
			     "(key: value), not a %s",
			     gp_node_kind_name(spec->root->kind));
		gp_spec_destroy(spec);
		return NULL;
	}
	if (!spec->root) {
		gp_spec_destroy(spec);
		return NULL;
	}
	return spec;
}

struct gp_spec *gp_spec_load_file(const char *path, struct gp_diag *diag)
{
	FILE *file = fopen(path, "rb");
	if (!file) {
		gp_diag_fail(diag, GP_MSG_CANNOT_OPEN, NULL,
			     "%s: cannot open: %s", path, strerror(errno));
		return NULL;
	}
	char *data = malloc(GP_SPEC_MAX_BYTES + 1);
	size_t size = data ? fread(data, 1, GP_SPEC_MAX_BYTES + 1, file) : 0;
	bool failed = !data || ferror(file);
	fclose(file);
	struct gp_spec *spec = NULL;
	if (failed)
		gp_diag_fail(diag, GP_MSG_CANNOT_READ, NULL,
			     "%s: cannot read: %s", path,
			     data ? strerror(errno) : "out of memory");
	else
		spec = gp_spec_load_buffer(path, data, size, diag);
	free(data);
	return spec;
}

void gp_spec_destroy(struct gp_spec *spec)
{
	if (!spec)
		return;
	node_destroy(spec->root);
	for (size_t i = 0; i < spec->override_count; i++)
		free(spec->overrides[i]);
	free(spec->overrides);
	for (size_t i = 0; i < spec->label_count; i++)
		free(spec->labels[i]);
	free(spec->labels);
	free(spec->file);
	free(spec);
}

/* --- overrides ------------------------------------------------------------ */

static struct gp_node *child(struct gp_node *node, const char *name)
{
	if (node->kind == GP_NODE_MAP) {
		for (size_t i = 0; i < node->count; i++)
			if (strcmp(node->keys[i]->text, name) == 0)
				return node->items[i];
		return NULL;
	}
	if (node->kind == GP_NODE_SEQUENCE) {
		char *end;
		long index = strtol(name, &end, 10);
		if (*name && !*end && index >= 1 && (size_t)index <= node->count)
			return node->items[index - 1];
	}
	return NULL;
}

static bool add_key(struct gp_node *map, const char *name,
		    struct gp_node *value, struct gp_where where)
{
	struct gp_node *key = calloc(1, sizeof(*key));
	struct gp_node **items = realloc(map->items,
					 (map->count + 1) * sizeof(*items));
	if (items)
		map->items = items;
	struct gp_node **keys = realloc(map->keys,
					(map->count + 1) * sizeof(*keys));
	if (keys)
		map->keys = keys;
	if (!key || !items || !keys || !(key->text = strdup(name))) {
		free(key);
		return false;
	}
	key->kind = GP_NODE_SCALAR;
	key->where = where;
	map->keys[map->count] = key;
	map->items[map->count++] = value;
	return true;
}

/* Append a copy of text to a string list. */
static const char *remember(char ***list, size_t *count, const char *text)
{
	char **grown = realloc(*list, (*count + 1) * sizeof(*grown));
	if (!grown)
		return NULL;
	*list = grown;
	grown[*count] = strdup(text);
	return grown[*count] ? grown[(*count)++] : NULL;
}

/* Walk path segments; the last one may be new in an existing map. */
static bool graft(struct gp_spec *spec, char *path, struct gp_node *value,
		  struct gp_where where, struct gp_diag *diag)
{
	struct gp_node *node = spec->root;
	char *save = NULL;
	char *part = strtok_r(path, ".", &save);
	while (part) {
		char *next = strtok_r(NULL, ".", &save);
		struct gp_node *found = child(node, part);
		if (!next) {
			if (found) {
				size_t i = 0;
				while (node->items[i] != found)
					i++;
				node_destroy(found);
				node->items[i] = value;
				return true;
			}
			if (node->kind != GP_NODE_MAP)
				break;
			if (!add_key(node, part, value, where))
				return gp_diag_oom(diag, &where);
			return true;
		}
		if (!found || found->kind == GP_NODE_SCALAR) {
			node_destroy(value);
			return gp_diag_fail(diag, GP_MSG_UNKNOWN_SECTION,
					    &where,
					    "'%s' is not a section of the "
					    "description; expected a key "
					    "path such as "
					    "blocks.main.cell_pitch",
					    part);
		}
		node = found;
		part = next;
	}
	node_destroy(value);
	return gp_diag_fail(diag, GP_MSG_BAD_KEY_PATH, &where,
			    "cannot set this path: its last part must name "
			    "a key or a sequence item (from 1)");
}

/* Every part of a key path names something: no empty part, none longer
 * than a value may be. */
static bool check_path(const char *path, size_t length,
		       const struct gp_where *where, struct gp_diag *diag)
{
	size_t part = 0;
	for (size_t i = 0; i <= length; i++) {
		if (i < length && path[i] != '.') {
			if (++part > GP_SPEC_MAX_SCALAR)
				return gp_diag_fail(diag, GP_MSG_BAD_KEY_PATH,
						    where,
						    "a part of the key path "
						    "is longer than %d bytes",
						    GP_SPEC_MAX_SCALAR);
			continue;
		}
		if (part == 0)
			return gp_diag_fail(diag, GP_MSG_BAD_KEY_PATH, where,
					    "the key path '%.*s' has an "
					    "empty part; expected a key path "
					    "such as blocks.main.cell_pitch",
					    length > 200 ? 200 : (int)length,
					    path);
		part = 0;
	}
	return true;
}

bool gp_spec_override(struct gp_spec *spec, const char *assignment,
		      int number, struct gp_diag *diag)
{
	char label[32];
	snprintf(label, sizeof(label), "--set #%d", number);
	const char *equals = strchr(assignment, '=');
	if (!equals || equals == assignment)
		return gp_diag_fail(diag, GP_MSG_BAD_OVERRIDE, NULL,
				    "%s: expected KEY.PATH=VALUE, got '%s'",
				    label, assignment);
	/* grafted nodes name the override as their file */
	struct gp_where where = { remember(&spec->labels, &spec->label_count,
					   label), 0, 0 };
	if (!where.file)
		return gp_diag_oom(diag, &(struct gp_where){ label, 0, 0 });
	if (!check_path(assignment, (size_t)(equals - assignment), &where,
			diag))
		return false;
	const char *text = equals + 1;
	if (!*text)
		return gp_diag_fail(diag, GP_MSG_BAD_OVERRIDE, &where,
				    "the value after '=' is empty");
	struct gp_node *value = parse_tree(where.file, text, strlen(text),
					   true, &spec->node_count, diag);
	if (!value)
		return false;
	char *path = strndup(assignment, (size_t)(equals - assignment));
	if (!path) {
		node_destroy(value);
		return gp_diag_oom(diag, &where);
	}
	bool ok = graft(spec, path, value, where, diag);
	free(path);
	if (ok && !remember(&spec->overrides, &spec->override_count,
			    assignment))
		return gp_diag_oom(diag, &where);
	return ok;
}

/* --- reading ------------------------------------------------------------- */

const char *gp_node_kind_name(enum gp_node_kind kind)
{
	switch (kind) {
	case GP_NODE_SCALAR:
		return "single value";
	case GP_NODE_SEQUENCE:
		return "list";
	case GP_NODE_MAP:
		return "map";
	}
	return "?";
}

void gp_reader_begin(struct gp_reader *reader, const struct gp_node *node,
		     const char *what, struct gp_diag *diag)
{
	memset(reader, 0, sizeof(*reader));
	reader->what = what;
	reader->diag = diag;
	reader->ok = true;
	if (node && node->kind != GP_NODE_MAP) {
		reader->ok = gp_diag_fail(diag, GP_MSG_NOT_A_MAP, &node->where,
					  "%s must be a map of keys, not a %s",
					  what, gp_node_kind_name(node->kind));
		return;
	}
	reader->map = node;
}

static size_t edit_distance(const char *a, const char *b)
{
	size_t la = strlen(a), lb = strlen(b);
	if (la > 64 || lb > 64)
		return SIZE_MAX;
	size_t row[65];
	for (size_t j = 0; j <= lb; j++)
		row[j] = j;
	for (size_t i = 1; i <= la; i++) {
		size_t diagonal = row[0];
		row[0] = i;
		for (size_t j = 1; j <= lb; j++) {
			size_t above = row[j];
			size_t cost = a[i - 1] == b[j - 1] ? 0 : 1;
			size_t best = diagonal + cost;
			if (above + 1 < best)
				best = above + 1;
			if (row[j - 1] + 1 < best)
				best = row[j - 1] + 1;
			row[j] = best;
			diagonal = above;
		}
	}
	return row[lb];
}

const char *gp_nearest_word(const char *word, const char *const *candidates,
			    size_t count)
{
	const char *best = NULL;
	size_t best_distance = SIZE_MAX;
	for (size_t i = 0; i < count; i++) {
		size_t d = edit_distance(word, candidates[i]);
		if (d < best_distance) {
			best_distance = d;
			best = candidates[i];
		}
	}
	size_t length = strlen(word);
	size_t allowed = length <= 4 ? 1 : length <= 8 ? 2 : 3;
	return best_distance <= allowed ? best : NULL;
}

static void list_known(const struct gp_reader *reader, char *out,
		       size_t size)
{
	out[0] = '\0';
	for (size_t i = 0; i < reader->known_count; i++) {
		size_t used = strlen(out);
		snprintf(out + used, size - used, "%s%s", i ? ", " : "",
			 reader->known[i]);
	}
}

static void (*reader_observer)(const struct gp_reader *reader, void *data);
static void *reader_observer_data;

void gp_reader_observe(void (*observer)(const struct gp_reader *reader,
					void *data),
		       void *data)
{
	reader_observer = observer;
	reader_observer_data = data;
}

bool gp_reader_end(struct gp_reader *reader)
{
	if (!reader->map)
		return reader->ok;
	if (reader_observer)
		reader_observer(reader, reader_observer_data);
	for (size_t i = 0; i < reader->map->count; i++) {
		const struct gp_node *key = reader->map->keys[i];
		bool known = false;
		for (size_t k = 0; k < reader->known_count && !known; k++)
			known = strcmp(reader->known[k], key->text) == 0;
		if (known)
			continue;
		const char *near = gp_nearest_word(key->text, reader->known,
						   reader->known_count);
		if (near) {
			reader->ok = gp_diag_fail(
				reader->diag, GP_MSG_UNKNOWN_KEY, &key->where,
				"unknown key '%s' in %s; did you mean '%s'?",
				key->text, reader->what, near);
		} else {
			char known_list[1024];
			list_known(reader, known_list, sizeof(known_list));
			reader->ok = gp_diag_fail(
				reader->diag, GP_MSG_UNKNOWN_KEY, &key->where,
				"unknown key '%s' in %s; expected one of: %s",
				key->text, reader->what, known_list);
		}
	}
	return reader->ok;
}

static const struct gp_node *find_key(const struct gp_reader *reader,
				      const char *key)
{
	if (!reader->map)
		return NULL;
	for (size_t i = 0; i < reader->map->count; i++)
		if (strcmp(reader->map->keys[i]->text, key) == 0)
			return reader->map->items[i];
	return NULL;
}

/* Is some key of the map a near miss of key (but not key itself)? */
static bool misspelt(const struct gp_reader *reader, const char *key)
{
	for (size_t i = 0; i < reader->map->count; i++)
		if (strcmp(reader->map->keys[i]->text, key) != 0 &&
		    gp_nearest_word(reader->map->keys[i]->text, &key, 1))
			return true;
	return false;
}

const struct gp_node *gp_read_node(struct gp_reader *reader, const char *key,
				   bool required)
{
	if (reader->known_count < sizeof(reader->known) /
					  sizeof(reader->known[0])) {
		bool seen = false;
		for (size_t i = 0; i < reader->known_count && !seen; i++)
			seen = strcmp(reader->known[i], key) == 0;
		if (!seen)
			reader->known[reader->known_count++] = key;
	}
	const struct gp_node *node = find_key(reader, key);
	const struct gp_node *empty = NULL;
	if (node && node->kind == GP_NODE_SCALAR && !node->quoted &&
	    (node->text[0] == '\0' || strcmp(node->text, "~") == 0 ||
	     strcmp(node->text, "null") == 0)) {
		empty = node; /* "key:" with nothing after it */
		node = NULL;
	}
	if (!node && required && reader->map) {
		reader->ok = false;
		if (empty)
			gp_diag_fail(reader->diag, GP_MSG_EMPTY_VALUE,
				     &empty->where,
				     "required key '%s' in %s has no value",
				     key, reader->what);
		/* a misspelt key is reported once, as unknown, at the end */
		else if (!misspelt(reader, key))
			gp_diag_fail(reader->diag, GP_MSG_MISSING_KEY,
				     &reader->map->where,
				     "missing required key '%s' in %s", key,
				     reader->what);
	}
	return node;
}

static bool fail(struct gp_reader *reader)
{
	reader->ok = false;
	return false;
}

/* Scalar check with the key's name in the message. */
static bool scalar_of(const struct gp_node *node, const char *key,
		      struct gp_diag *diag, const char *expected)
{
	if (node->kind == GP_NODE_SCALAR)
		return true;
	return gp_diag_fail(diag, GP_MSG_WRONG_KIND, &node->where,
			    "'%s' must be %s, not a %s", key, expected,
			    gp_node_kind_name(node->kind));
}

static bool length_of(const struct gp_node *node, const char *key,
		      struct gp_diag *diag, int64_t *out)
{
	if (!scalar_of(node, key, diag, "a length in millimetres"))
		return false;
	const char *why;
	if (!gp_parse_mm(node->text, out, &why))
		return gp_diag_fail(diag, GP_MSG_BAD_VALUE, &node->where,
				    "'%s' value '%s' %s", key, node->text, why);
	return true;
}

bool gp_node_length(const struct gp_node *node, struct gp_diag *diag,
		    int64_t *out)
{
	return length_of(node, "value", diag, out);
}

bool gp_read_length(struct gp_reader *reader, const char *key, bool required,
		    int64_t *out)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	return length_of(node, key, reader->diag, out) || fail(reader);
}

bool gp_read_size(struct gp_reader *reader, const char *key, bool required,
		  int64_t *out)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	if (!length_of(node, key, reader->diag, out))
		return fail(reader);
	if (*out <= 0) {
		gp_diag_fail(reader->diag, GP_MSG_NOT_POSITIVE, &node->where,
			     "'%s' must be greater than zero, got %s", key,
			     node->text);
		return fail(reader);
	}
	return true;
}

static bool pair_of(struct gp_reader *reader, const char *key, bool required,
		    int64_t out[2], bool positive)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	if (node->kind != GP_NODE_SEQUENCE || node->count != 2) {
		gp_diag_fail(reader->diag, GP_MSG_NOT_A_PAIR, &node->where,
			     "'%s' must be a pair of lengths [x, y] in "
			     "millimetres",
			     key);
		return fail(reader);
	}
	int64_t values[2];
	for (int i = 0; i < 2; i++) {
		const struct gp_node *item = node->items[i];
		if (!length_of(item, key, reader->diag, &values[i]))
			return fail(reader);
		if (positive && values[i] <= 0) {
			gp_diag_fail(reader->diag, GP_MSG_NOT_POSITIVE,
				     &item->where,
				     "'%s' values must be greater than zero, "
				     "got %s",
				     key, item->text);
			return fail(reader);
		}
	}
	out[0] = values[0];
	out[1] = values[1];
	return true;
}

bool gp_read_pair(struct gp_reader *reader, const char *key, bool required,
		  int64_t out[2])
{
	return pair_of(reader, key, required, out, false);
}

bool gp_read_size_pair(struct gp_reader *reader, const char *key,
		       bool required, int64_t out[2])
{
	return pair_of(reader, key, required, out, true);
}

static bool int_of(const struct gp_node *node, const char *key,
		   struct gp_diag *diag, long min, long max, long *out)
{
	if (!scalar_of(node, key, diag, "a whole number"))
		return false;
	const char *p = node->text;
	char *end;
	errno = 0;
	long value = strtol(p, &end, 10);
	if (node->quoted || *p == '\0' || *end != '\0' || errno == ERANGE ||
	    (*p != '-' && *p != '+' && (*p < '0' || *p > '9')))
		return gp_diag_fail(diag, GP_MSG_NOT_WHOLE, &node->where,
				    "'%s' must be a whole number, got '%s'",
				    key, node->text);
	if (value < min || value > max)
		return gp_diag_fail(diag, GP_MSG_OUT_OF_RANGE, &node->where,
				    "'%s' must be from %ld to %ld, got %ld",
				    key, min, max, value);
	*out = value;
	return true;
}

bool gp_node_int(const struct gp_node *node, struct gp_diag *diag, long min,
		 long max, long *out)
{
	return int_of(node, "value", diag, min, max, out);
}

bool gp_read_int(struct gp_reader *reader, const char *key, bool required,
		 long min, long max, long *out)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	return int_of(node, key, reader->diag, min, max, out) || fail(reader);
}

bool gp_read_int_pair(struct gp_reader *reader, const char *key,
		      bool required, long min, long max, long out[2])
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	if (node->kind != GP_NODE_SEQUENCE || node->count != 2) {
		gp_diag_fail(reader->diag, GP_MSG_NOT_A_PAIR, &node->where,
			     "'%s' must be a pair of whole numbers [x, y]",
			     key);
		return fail(reader);
	}
	long values[2];
	for (int i = 0; i < 2; i++)
		if (!int_of(node->items[i], key, reader->diag, min, max,
			    &values[i]))
			return fail(reader);
	out[0] = values[0];
	out[1] = values[1];
	return true;
}

static bool double_of(const struct gp_node *node, const char *key,
		      struct gp_diag *diag, double min, double max,
		      double *out)
{
	if (!scalar_of(node, key, diag, "a number"))
		return false;
	double value = 0;
	if (node->quoted || !gp_parse_decimal(node->text, &value))
		return gp_diag_fail(diag, GP_MSG_NOT_A_NUMBER, &node->where,
				    "'%s' must be a number, got '%s'", key,
				    node->text);
	if (value < min || value > max)
		return gp_diag_fail(diag, GP_MSG_OUT_OF_RANGE, &node->where,
				    "'%s' must be from %g to %g, got %s", key,
				    min, max, node->text);
	*out = value;
	return true;
}

bool gp_node_double(const struct gp_node *node, struct gp_diag *diag,
		    double min, double max, double *out)
{
	return double_of(node, "value", diag, min, max, out);
}

bool gp_read_double(struct gp_reader *reader, const char *key, bool required,
		    double min, double max, double *out)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	return double_of(node, key, reader->diag, min, max, out) ||
	       fail(reader);
}

bool gp_read_bool(struct gp_reader *reader, const char *key, bool required,
		  bool *out)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	if (!scalar_of(node, key, reader->diag, "true or false"))
		return fail(reader);
	if (!node->quoted && (strcmp(node->text, "true") == 0 ||
			      strcmp(node->text, "yes") == 0)) {
		*out = true;
		return true;
	}
	if (!node->quoted && (strcmp(node->text, "false") == 0 ||
			      strcmp(node->text, "no") == 0)) {
		*out = false;
		return true;
	}
	gp_diag_fail(reader->diag, GP_MSG_NOT_BOOLEAN, &node->where,
		     "'%s' must be true or false, got '%s'", key, node->text);
	return fail(reader);
}

bool gp_read_string(struct gp_reader *reader, const char *key, bool required,
		    const char **out)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	if (!scalar_of(node, key, reader->diag, "text"))
		return fail(reader);
	*out = node->text;
	return true;
}

bool gp_read_choice(struct gp_reader *reader, const char *key, bool required,
		    const char *const *choices, int *out)
{
	const struct gp_node *node = gp_read_node(reader, key, required);
	if (!node)
		return !required;
	if (!scalar_of(node, key, reader->diag, "a word"))
		return fail(reader);
	size_t count = 0;
	for (; choices[count]; count++) {
		if (strcmp(choices[count], node->text) == 0) {
			*out = (int)count;
			return true;
		}
	}
	char list[512] = "";
	for (size_t i = 0; i < count; i++) {
		size_t used = strlen(list);
		snprintf(list + used, sizeof(list) - used, "%s%s",
			 i ? ", " : "", choices[i]);
	}
	const char *near = gp_nearest_word(node->text, choices, count);
	if (near)
		gp_diag_fail(reader->diag, GP_MSG_UNKNOWN_CHOICE, &node->where,
			     "'%s' value '%s' is not known; did you mean "
			     "'%s'? (one of: %s)",
			     key, node->text, near, list);
	else
		gp_diag_fail(reader->diag, GP_MSG_UNKNOWN_CHOICE, &node->where,
			     "'%s' value '%s' is not known; expected one "
			     "of: %s",
			     key, node->text, list);
	return fail(reader);
}

bool gp_node_expect_sequence(const struct gp_node *node, size_t count,
			     struct gp_diag *diag)
{
	if (node->kind != GP_NODE_SEQUENCE)
		return gp_diag_fail(diag, GP_MSG_NOT_A_LIST, &node->where,
				    "expected a list, not a %s",
				    gp_node_kind_name(node->kind));
	if (count && node->count != count)
		return gp_diag_fail(diag, GP_MSG_WRONG_COUNT, &node->where,
				    "expected a list of %zu items, got %zu",
				    count, node->count);
	return true;
}

bool gp_node_expect_map(const struct gp_node *node, struct gp_diag *diag)
{
	if (node->kind == GP_NODE_MAP)
		return true;
	return gp_diag_fail(diag, GP_MSG_NOT_A_MAP, &node->where,
			    "expected a map of keys, "
			    "not a %s",
			    gp_node_kind_name(node->kind));
}

bool gp_node_expect_scalar(const struct gp_node *node, struct gp_diag *diag)
{
	if (node->kind == GP_NODE_SCALAR)
		return true;
	return gp_diag_fail(diag, GP_MSG_WRONG_KIND, &node->where,
			    "expected a single value, "
			    "not a %s",
			    gp_node_kind_name(node->kind));
}
