/**
 * A set of terms in which adding a term on the same orbitals and cell sums the amplitudes, and
 * adding the Hermitian partner of an existing term folds its conjugate into it. The model builders
 * produce terms this way, so their output never repeats a term or its partner.
 */
import { addAmplitudes, conjugateAmplitude, isZero } from './amplitude.js';
import type { Amplitude, TermSpec } from './spec.js';

function termKey(from: string, to: string, cell: readonly number[]): string {
  return `${from}|${to}|${cell.map((c) => c || 0).join(',')}`;
}

export class TermSet {
  private readonly terms: TermSpec[] = [];
  private readonly index = new Map<string, number>();

  add(from: string, to: string, cell: readonly number[], amplitude: Amplitude): this {
    const same = this.index.get(termKey(from, to, cell));
    if (same !== undefined) {
      this.terms[same].amplitude = addAmplitudes(this.terms[same].amplitude, amplitude);
      return this;
    }
    const partner = this.index.get(termKey(to, from, cell.map((c) => -c)));
    if (partner !== undefined) {
      this.terms[partner].amplitude = addAmplitudes(this.terms[partner].amplitude, conjugateAmplitude(amplitude));
      return this;
    }
    this.index.set(termKey(from, to, cell), this.terms.length);
    this.terms.push({ from, to, cell: cell.map((c) => c || 0), amplitude });
    return this;
  }

  /** The terms, without those whose amplitude summed to exactly zero. */
  list(): TermSpec[] {
    return this.terms.filter((t) => !isZero(t.amplitude)).map((t) => ({ ...t, cell: [...t.cell] }));
  }
}
