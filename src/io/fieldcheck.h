/* fieldcheck.h - the strings the review queue takes in and writes out.
 *
 * Every string that reaches a queue and from there an export (the TSV
 * delta, Turtle, N-Triples) passes these checks on the way in (review
 * add, decide, accept, reject, defer) and again on the way out (export),
 * so that no field can end a row, a line or a statement early: no
 * control characters (C0, DEL, C1), no line or paragraph separators, no
 * invalid UTF-8, bounded lengths, BCP 47 tags and IRI characters where
 * the formats expect them.
 *
 * Each check returns TM_OK (0) when s[0..n) is fine, or TM_EINPUT (err.h)
 * with a reason in why
 * (FC_WHY bytes, a phrase such as "holds U+000A (a control character)
 * at byte 5" that never quotes the string itself). */
#ifndef TM_FIELDCHECK_H
#define TM_FIELDCHECK_H

#include <stddef.h>

#include "core/err.h"

/* The limits, in bytes of UTF-8 (README, "The curators' queue"). */
#define FC_ID_MAX 64      /* a suggestion's id (ours are 16 hex digits) */
#define FC_LABEL_MAX 512  /* label, label_as_written */
#define FC_OCC_MAX 2048   /* an occupation's IRI or id */
#define FC_LANG_MAX 64    /* a language tag */
#define FC_NAME_MAX 128   /* a reviewer's name */
#define FC_NOTE_MAX 2000  /* a decision's note */

#define FC_WHY 96

/* Text: 1 to max bytes of UTF-8 without C0 controls (tab and line ends among them), DEL, C1 controls
 * (U+0080-U+009F, NEL among them), U+2028 or U+2029. */
int fc_text(const char *s, size_t n, size_t max, char why[FC_WHY]);

/* A label: text of at most FC_LABEL_MAX bytes. */
int fc_label(const char *s, size_t n, char why[FC_WHY]);
/* A reviewer's name: text of at most FC_NAME_MAX bytes. */
int fc_name(const char *s, size_t n, char why[FC_WHY]);
/* A note: empty, or text of at most FC_NOTE_MAX bytes. */
int fc_note(const char *s, size_t n, char why[FC_WHY]);
/* A suggestion's id: 1 to FC_ID_MAX printable ASCII characters, no
 * space. */
int fc_id(const char *s, size_t n, char why[FC_WHY]);
/* A language tag: well-formed by RFC 5646, at most FC_LANG_MAX bytes. */
int fc_lang(const char *s, size_t n, char why[FC_WHY]);
/* An occupation: an IRI or an id, 1 to FC_OCC_MAX bytes of the
 * characters RFC 3987 allows in an IRI (letters, digits, -._~ :/?#[]@
 * !$&'()*+,;= , %XX escapes, and the non-ASCII ucschar and iprivate
 * ranges): never a space, a control character or one of <>"{}|\^`. */
int fc_occupation(const char *s, size_t n, char why[FC_WHY]);

/* A suggestion (a propose object): its id, occupation, lang and label,
 * and label_as_written, variant_of and competitor.occupation when they
 * are strings.  Missing or mistyped required fields are the caller's to
 * report; this only judges the strings present.  Returns TM_OK, or TM_EINPUT with
 * the field's name in *field and the reason in why. */
struct jr_val;
int fc_suggestion(const struct jr_val *v, const char **field, char why[FC_WHY]);

#endif
