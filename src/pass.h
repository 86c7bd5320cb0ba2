/* pass.h - the normaliser's rules over an annotated title (title.h).
 * Each marks tokens removed with their kind and records the facet
 * spans; none touches anything but the title it is given (and reads its
 * lexicon).  All return 0, or -1 when memory ran out. */
#ifndef TM_PASS_H
#define TM_PASS_H

#include "title.h"

int pass_pii(tm_title *ti);       /* contact data: URLs, e-mail, phones */
int pass_gender(tm_title *ti);    /* markers, gendered spellings, pairs */
int pass_reference(tm_title *ti); /* reference codes and dates */
int pass_pay(tm_title *ti);
int pass_schedule(tm_title *ti);  /* hours, workload, durations */
int pass_hashtags(tm_title *ti);
int pass_employer(tm_title *ti);
int pass_location(tm_title *ti);
int pass_phrases(tm_title *ti);   /* peels edge phrases to a fixpoint */

#endif
