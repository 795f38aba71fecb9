/**
 * A 5x9 bitmap font (7 rows and 2 for descenders) for the static pictures (snapshot/): printable ASCII and the few other
 * characters our figure titles use. Each glyph is seven rows (nine with descenders), top first,
 * five bits each (the high bit is the leftmost pixel). Characters without a glyph are first simplified (subscript digits to
 * digits, combining marks dropped, dashes to '-'), then drawn as '?'.
 */

export const GLYPH_WIDTH = 5;
export const GLYPH_HEIGHT = 9;

const ASCII =
  // ' ' ! " # $ % & ' ( ) * + , - . /
  '00000000000000 04040404040004 0a0a0a00000000 0a0a1f0a1f0a0a 040f140e051e04 18190204081303 0c12140815120d 0c040800000000 02040808080402 08040202020408 0004150e150400 0004041f040400 000000000c0408 0000001f000000 00000000000c0c 00010204081000 ' +
  // 0-9
  '0e11131519110e 040c040404040e 0e11010204081f 1f02040201110e 02060a121f0202 1f101e0101110e 0608101e11110e 1f010204080808 0e11110e11110e 0e11110f01020c ' +
  // : ; < = > ? @
  '000c0c000c0c00 000c0c000c0408 02040810080402 00001f001f0000 08040201020408 0e110102040004 0e11010d15150e ' +
  // A-Z
  '0e1111111f1111 1e11111e11111e 0e11101010110e 1c12111111121c 1f10101e10101f 1f10101e101010 0e11101711110f 1111111f111111 0e04040404040e 0702020202120c 11121418141211 1010101010101f 111b1515111111 11111915131111 0e11111111110e 1e11111e101010 0e11111115120d 1e11111e141211 0f10100e01011e 1f040404040404 1111111111110e 11111111110a04 1111111515150a 11110a040a1111 1111110a040404 1f01020408101f ' +
  // [ \ ] ^ _ `
  '0e08080808080e 00100804020100 0e02020202020e 040a1100000000 0000000000001f 08040200000000 ' +
  // a-z
  '00000e010f110f 1010161911111e 00000e1010110e 01010d1311110f 00000e111f100e 0609081c080808 000f11110f010e 10101619111111 04000c0404040e 0200060202120c 10101214181412 0c04040404040e 00001a15151111 00001619111111 00000e1111110e 00001e111e1010 00000d130f0101 00001619101010 00000e100e011e 08081c08080906 0000111111130d 00001111110a04 0000111115150a 0000110a040a11 000011110f010e 00001f0204081f ' +
  // { | } ~
  '02040408040402 04040404040404 08040402040408 00000815020000 ';

function parse(hex: string): number[] {
  const clean = hex.replace(/\s/g, '');
  if (clean.length !== 14 && clean.length !== 18) throw new Error(`font: glyph "${hex}" is not seven or nine rows`);
  const rows = Array.from({ length: clean.length / 2 }, (_, i) => parseInt(clean.slice(2 * i, 2 * i + 2), 16));
  return rows.length === GLYPH_HEIGHT ? rows : [...rows, 0, 0];
}

const GLYPHS = new Map<string, number[]>();
{
  const digits = ASCII.replace(/\s/g, '');
  const count = 126 - 32 + 1;
  if (digits.length !== count * 14) throw new Error(`font: expected ${count} glyphs, found ${digits.length / 14}`);
  for (let i = 0; i < count; i++) GLYPHS.set(String.fromCharCode(32 + i), parse(digits.slice(14 * i, 14 * i + 14)));
  const extra: Record<string, string> = {
    // Descenders.
    g: '00000f1111110f010e',
    j: '02000602020202120c',
    p: '00001e1111111e1010',
    q: '00000f1111110f0101',
    y: '0000111111110f010e',
    ',': '000000000c0c040800',
    ';': '000c0c00000c0c0408',
    'Γ': '1f101010101010',
    'Ω': '0e1111110a0a1b',
    'Δ': '04040a0a11111f',
    'φ': '040e1515150e04',
    'Σ': '1f10080408101f',
    ρ: '00000e1111111e1010',
    '·': '00000004000000',
    '×': '00110a040a1100',
    '°': '0c12120c000000',
    '±': '04041f0404001f',
    '≤': '02040804021f00',
    '≥': '08040204081f00',
    '…': '00000000001500',
  };
  for (const [ch, hex] of Object.entries(extra)) GLYPHS.set(ch, parse(hex));
}

const SIMPLER: Record<string, string> = {
  '—': '-',
  '–': '-',
  '−': '-',
  '⁻': '-',
  'π': 'pi',
  'λ': 'lambda',
  'μ': 'mu',
  'θ': 'theta',
  'η': 'eta',
};
const SUBSCRIPTS = '₀₁₂₃₄₅₆₇₈₉';
const SUPERSCRIPTS = '⁰¹²³⁴⁵⁶⁷⁸⁹';

/** The text as the font can draw it: one glyph per character of the returned string. */
export function drawable(text: string): string {
  let out = '';
  for (const ch of text.normalize('NFD')) {
    if (/\p{M}/u.test(ch)) continue; // combining marks (x̄ -> x)
    if (GLYPHS.has(ch)) out += ch;
    else if (SIMPLER[ch] !== undefined) out += SIMPLER[ch];
    else if (SUBSCRIPTS.includes(ch)) out += String(SUBSCRIPTS.indexOf(ch));
    else if (SUPERSCRIPTS.includes(ch)) out += String(SUPERSCRIPTS.indexOf(ch));
    else out += '?';
  }
  return out;
}

/** Rows of a drawable character (see `drawable`). */
export function glyph(ch: string): number[] {
  return GLYPHS.get(ch) ?? (GLYPHS.get('?') as number[]);
}

/** Pixels across a text drawn at `scale` (one blank column between glyphs). */
export function textWidth(text: string, scale: number): number {
  const n = drawable(text).length;
  return n === 0 ? 0 : (n * (GLYPH_WIDTH + 1) - 1) * scale;
}
