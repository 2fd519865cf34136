/**
 * Renders user-written Markdown (model notes) to safe HTML: marked for the Markdown, KaTeX for the
 * `$…$` and `$$…$$` math (rendered on the server, so no client script is needed), then
 * sanitize-html with an allowlist that keeps what KaTeX emits (its span classes and inline sizes,
 * MathML for screen readers, the small SVGs of radicals) and drops everything else: scripts,
 * event handlers, forms, iframes, styles beyond KaTeX's box metrics, and links other than
 * http(s), mailto and same-site paths. Relative imports only.
 */
import { Marked } from 'marked';
import markedKatex from 'marked-katex-extension';
import sanitizeHtml from 'sanitize-html';

const MATHML_TAGS = [
	'math',
	'semantics',
	'annotation',
	'mrow',
	'mi',
	'mo',
	'mn',
	'ms',
	'mtext',
	'mspace',
	'msup',
	'msub',
	'msubsup',
	'mfrac',
	'msqrt',
	'mroot',
	'mover',
	'munder',
	'munderover',
	'mtable',
	'mtr',
	'mtd',
	'mstyle',
	'mpadded',
	'mphantom',
	'menclose',
	'mglyph',
	'mlabeledtr',
	'mmultiscripts',
	'mprescripts',
	'none'
];

const MATHML_ATTRIBUTES = [
	'xmlns',
	'encoding',
	'display',
	'displaystyle',
	'scriptlevel',
	'mathvariant',
	'mathsize',
	'stretchy',
	'fence',
	'separator',
	'lspace',
	'rspace',
	'accent',
	'accentunder',
	'minsize',
	'maxsize',
	'movablelimits',
	'symmetric',
	'largeop',
	'width',
	'height',
	'depth',
	'voffset',
	'linethickness',
	'columnalign',
	'columnspacing',
	'rowspacing',
	'rowalign',
	'columnlines',
	'rowlines',
	'frame',
	'notation',
	'mathcolor'
];

/** A length in KaTeX's box metrics: `-0.345em`, `0`, `400em`, `1.08em`. */
const LENGTH = /^-?\d*\.?\d+(em|ex|px|pt|mu|%)?$/;

const OPTIONS: sanitizeHtml.IOptions = {
	allowedTags: [
		'h1',
		'h2',
		'h3',
		'h4',
		'h5',
		'h6',
		'p',
		'br',
		'hr',
		'blockquote',
		'pre',
		'code',
		'em',
		'strong',
		'del',
		's',
		'sup',
		'sub',
		'ul',
		'ol',
		'li',
		'a',
		'img',
		'table',
		'thead',
		'tbody',
		'tr',
		'th',
		'td',
		'span',
		'div',
		'svg',
		'path',
		'line',
		...MATHML_TAGS
	],
	allowedAttributes: {
		a: ['href', 'title'],
		img: ['src', 'alt', 'title', 'width', 'height'],
		th: ['align'],
		td: ['align'],
		ol: ['start'],
		code: ['class'],
		span: ['class', 'style', 'aria-hidden', 'title'],
		div: ['class'],
		svg: ['xmlns', 'width', 'height', 'viewbox', 'viewBox', 'preserveaspectratio', 'preserveAspectRatio', 'style'],
		path: ['d'],
		line: ['x1', 'x2', 'y1', 'y2', 'stroke-width'],
		...Object.fromEntries(MATHML_TAGS.map((t) => [t, MATHML_ATTRIBUTES]))
	},
	allowedClasses: {
		// KaTeX's own class names (katex, mord, vlist-t, …) and code-block language hints.
		span: [/^[a-z][a-z0-9-]*$/],
		div: [/^[a-z][a-z0-9-]*$/],
		code: [/^language-[a-z0-9-]+$/]
	},
	allowedStyles: {
		'*': {
			height: [LENGTH],
			'min-width': [LENGTH],
			width: [LENGTH],
			'vertical-align': [LENGTH],
			'margin-right': [LENGTH],
			'margin-left': [LENGTH],
			'padding-left': [LENGTH],
			top: [LENGTH],
			left: [LENGTH],
			'border-bottom-width': [LENGTH],
			'border-right-width': [LENGTH],
			'border-top-width': [LENGTH],
			// KaTeX colours the source of malformed math red.
			color: [/^#[0-9a-fA-F]{3,6}$/]
		}
	},
	allowedSchemes: ['http', 'https', 'mailto'],
	allowedSchemesByTag: { img: ['https'] },
	allowProtocolRelative: false,
	parser: { lowerCaseAttributeNames: false },
	transformTags: {
		a: sanitizeHtml.simpleTransform('a', { rel: 'noopener noreferrer nofollow' })
	}
};
// `rel` is added by the transform above and must survive the attribute filter.
(OPTIONS.allowedAttributes as Record<string, string[]>).a.push('rel');

/** The inline-math rule of marked-katex-extension (standard mode: a closing `$` is followed by space or punctuation). */
const INLINE_MATH = /^(\${1,2})(?!\$)((?:\\.|[^\\\n])*?(?:\\.|[^\\\n$]))\1(?=[\s?!.,:？！。，：]|$)/;

/**
 * Where inline math may start in `src`: a `$` at the start or after any white space. The
 * extension's own finder accepts only a preceding space, so math at the start of a wrapped line
 * (after a newline) was left as text.
 */
function inlineMathStart(src: string): number | undefined {
	let offset = 0;
	while (offset < src.length) {
		const index = src.indexOf('$', offset);
		if (index === -1) return undefined;
		if ((index === 0 || /\s/.test(src.charAt(index - 1))) && INLINE_MATH.test(src.slice(index))) return index;
		offset = index + 1;
		while (src.charAt(offset) === '$') offset++;
	}
	return undefined;
}

const katexExtension = markedKatex({ throwOnError: false, output: 'htmlAndMathml' });
for (const extension of katexExtension.extensions ?? []) {
	if (extension.name === 'inlineKatex' && 'start' in extension) extension.start = inlineMathStart;
}
const marked = new Marked({ gfm: true, breaks: false, async: false });
marked.use(katexExtension);

/** Largest note the renderer accepts (characters); longer input is cut, never executed. */
export const MAX_NOTE_CHARS = 200_000;

/**
 * Markdown with `$…$`/`$$…$$` math → sanitised HTML, safe for `{@html}`. Malformed math is shown
 * as KaTeX's error text, never thrown.
 */
export function renderNoteMarkdown(markdown: string): string {
	const source = markdown.length > MAX_NOTE_CHARS ? markdown.slice(0, MAX_NOTE_CHARS) : markdown;
	const html = marked.parse(source) as string;
	return sanitizeHtml(html, OPTIONS);
}
