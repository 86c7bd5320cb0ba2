/* libFuzzer target: the title normaliser on arbitrary bytes.
 *
 * Checks what holds for every input: the clean title and the key are
 * valid UTF-8 without newlines, and norm is idempotent (the clean title
 * is its own clean title); inputs up to 64 KiB, so that with libFuzzer's
 * -timeout a cost that grows faster than the input shows.  The bundled
 * lexicons are loaded once, from TITLEMILL_LEXDIR or the folder beside
 * the binary's build tree, and checked to be the bundled ones: a title
 * that only the scan and the rules over every category clean (a gender
 * marker, a schedule phrase, a place segment, an employer) must come out
 * clean, or the target stops at once rather than fuzz an empty lexicon.
 * The first byte picks the title's language among the 26 of the case
 * table, or none, so that every language's ambiguous entries and rules
 * are reached. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/decode.h"
#include "norm/norm.h"
#include "norm/setup.h"

static lexicon *LX;
static normaliser *NM, *NM2;

static const char *const LANGS[] = {
	"bg", "cs", "da", "de", "el", "en", "es", "et", "fi", "fr", "ga", "hr", "hu",
	"it", "lt", "lv", "mt", "nb", "nl", "pl", "pt", "ro", "sk", "sl", "sv", "tr",
};
#define NLANGS (sizeof LANGS / sizeof LANGS[0])

/* Stops when the lexicons did not load or the rules do not run. */
static void check_loaded(void)
{
	static const char raw[] = "Valdoria Logistik GmbH: Koch (m/w/d) – Vollzeit – Köln";
	norm_result r;
	if (norm_title(NM, raw, sizeof raw - 1, "de", &r) != 0 || r.title_len != 4 ||
	    memcmp(r.title, "koch", 4)) {
		fprintf(stderr, "fuzz_norm: the lexicons or the rules are not in use "
			"(TITLEMILL_LEXDIR?): \"%s\" gave \"%.*s\"\n", raw,
			(int)r.title_len, r.title);
		abort();
	}
}

int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
	setup_opts o;
	tm_buf err = {0};
	(void)argc;
	(void)argv;
	memset(&o, 0, sizeof o);
	o.base = getenv("TITLEMILL_LEXDIR");
	LX = setup_lexicon(&o, &err);
	if (!LX) {
		fprintf(stderr, "fuzz_norm: %.*s\n", (int)err.len, err.data);
		abort();
	}
	NM = norm_new(LX);
	NM2 = norm_new(LX);
	buf_free(&err);
	check_loaded();
	return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	norm_result r, r2;
	char *title;
	size_t pick = size ? data[0] % (NLANGS + 1) : NLANGS;
	const char *lang = pick < NLANGS ? LANGS[pick] : NULL;

	if (size > 65536) /* make fuzz runs with -max_len=65536 */
		return 0;
	if (norm_title(NM, (const char *)data, size, lang, &r) != 0)
		abort();
	if (!dec_is_utf8(r.title, r.title_len) || memchr(r.title, '\n', r.title_len) ||
	    !dec_is_utf8(r.key, r.key_len) || memchr(r.key, '\n', r.key_len))
		abort();
	title = malloc(r.title_len + 1);
	memcpy(title, r.title, r.title_len);
	if (norm_title(NM2, title, r.title_len, lang, &r2) != 0)
		abort();
	if (r2.title_len != r.title_len || memcmp(r2.title, title, r.title_len)) {
		fprintf(stderr, "not idempotent: \"%.*s\" -> \"%.*s\"\n", (int)r.title_len,
			title, (int)r2.title_len, r2.title);
		abort();
	}
	free(title);
	return 0;
}
