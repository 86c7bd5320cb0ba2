/* setup.h - building the lexicon a command runs with: the bundled
 * lexicons, the folders in TITLEMILL_LEXICONS and --lexicons, and the
 * labels of a taxonomy as protected phrases. */
#ifndef TM_SETUP_H
#define TM_SETUP_H

#include "core/buf.h"
#include "norm/lexicon.h"

typedef struct setup_opts {
	const char *base;        /* the bundled folder; NULL: found next to the binary */
	const char *extra[16];   /* --lexicons folders, read after the bundled ones */
	int nextra;
	const char *labels;      /* labels TSV whose labels are protected, or NULL */
} setup_opts;

/* Returns the lexicon, or NULL with a message in err. */
lexicon *setup_lexicon(const setup_opts *o, tm_buf *err);

/* The bundled lexicon folder that would be used, or NULL if none found. */
const char *setup_base_dir(void);

#endif
