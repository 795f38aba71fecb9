/**
 * One slider per model parameter, from its declared range and unit. The box beside each slider
 * accepts typed values; a value that is not a number or outside the range is refused with a message
 * naming the field and what was typed, and the box goes back to the value in use.
 */
import type { ParameterDecl } from '../../contract/protocol.js';
import { parameterValueProblem } from '../../src/model/parameters.js';
import { stepProblem } from '../../contract/option-sliders.js';

/** A slider's declaration: a parameter's, or a request option's with its own step (contract/option-sliders.ts). */
export type ControlDecl = ParameterDecl & { step?: number };

export interface ParameterControls {
  element: HTMLElement;
  /** Move the controls to values pushed from elsewhere (kernel, saved state) without firing onInput. */
  setValues(values: Record<string, number>): void;
  dispose(): void;
}

/** The slider's span: the declared range, else a window around the default (common practice). */
export function sliderRange(decl: ParameterDecl): [number, number] {
  if (decl.range) return decl.range;
  const half = Math.max(1, Math.abs(decl.default));
  return [decl.default - half, decl.default + half];
}

/** 400 steps over the span, rounded to a 1-2-5 value so typed and dragged values line up. */
export function sliderStep(lo: number, hi: number): number {
  const raw = (hi - lo) / 400;
  if (!(raw > 0)) return 1;
  const exponent = Math.floor(Math.log10(raw));
  const base = 10 ** exponent;
  const mantissa = raw / base;
  const nice = mantissa <= 1 ? 1 : mantissa <= 2 ? 2 : mantissa <= 5 ? 5 : 10;
  return nice * base;
}

export function formatValue(value: number): string {
  if (value === 0) return '0';
  const abs = Math.abs(value);
  return abs >= 1e4 || abs < 1e-3 ? value.toExponential(3) : String(Number(value.toPrecision(5)));
}

export function createParameterControls(
  parameters: Record<string, ControlDecl>,
  values: Record<string, number>,
  onInput: (name: string, value: number) => void,
  onInvalid: (message: string) => void,
): ParameterControls {
  const element = document.createElement('div');
  element.className = 'chernel-controls';
  const rows = new Map<string, { slider: HTMLInputElement; box: HTMLInputElement; committed: (text: string) => void }>();
  // Keys typed into a control are the control's, not notebook shortcuts (Enter, digits, arrows):
  // JupyterLab's key handler skips targets marked so (Lumino's data-lm-suppress-shortcuts).
  element.addEventListener('keydown', (event) => event.stopPropagation());

  for (const [name, decl] of Object.entries(parameters)) {
    const [lo, hi] = sliderRange(decl);
    const row = document.createElement('label');
    row.className = 'chernel-control';
    row.dataset.parameter = name;
    row.title = decl.doc ?? '';

    const caption = document.createElement('span');
    caption.className = 'chernel-control-name';
    caption.textContent = decl.unit ? `${name} [${decl.unit}]` : name;
    caption.title = caption.textContent;

    const slider = document.createElement('input');
    slider.type = 'range';
    slider.min = String(lo);
    slider.max = String(hi);
    slider.step = String(decl.step ?? sliderStep(lo, hi));
    slider.value = String(values[name] ?? decl.default);
    slider.setAttribute('aria-label', name);
    slider.setAttribute('data-lm-suppress-shortcuts', 'true');

    // A text box (with a numeric keyboard where there is one): a number box reports letters as ''.
    const box = document.createElement('input');
    box.type = 'text';
    box.inputMode = 'decimal';
    box.spellcheck = false;
    box.className = 'chernel-control-value';
    box.value = formatValue(values[name] ?? decl.default);
    box.setAttribute('aria-label', `${name} value`);
    box.setAttribute('data-lm-suppress-shortcuts', 'true');
    /** The box text last acted on, so Enter followed by blur commits once. */
    let committed = box.value;

    slider.addEventListener('input', () => {
      const value = Number(slider.value);
      box.value = formatValue(value);
      committed = box.value;
      onInput(name, value);
    });
    /** Puts the value in use back in the box and says why the typed one was refused. */
    const refuse = (why: string) => {
      const kept = formatValue(Number(slider.value));
      box.value = kept;
      committed = kept;
      onInvalid(`${name}: ${why}; kept ${kept}`);
    };
    const commit = () => {
      if (box.value === committed) return; // Enter, then blur: one commit
      const typed = box.value.trim();
      const value = typed === '' ? Number.NaN : Number(typed);
      // The engine's own check and message (src/model/parameters.ts); a non-number shows as typed.
      const problem = parameterValueProblem(Number.isFinite(value) ? value : typed, decl) ?? stepProblem(value, lo, decl.step);
      if (problem !== null) {
        refuse(problem);
        return;
      }
      committed = box.value;
      slider.value = String(value);
      onInput(name, value);
    };
    box.addEventListener('change', commit);
    // Enter commits too, also where a host (JupyterLab) keeps it from becoming a change event.
    box.addEventListener('keydown', (event) => {
      if (event.key === 'Enter') {
        event.preventDefault();
        commit();
      }
    });

    row.append(caption, slider, box);
    element.append(row);
    rows.set(name, { slider, box, committed: (text) => (committed = text) });
  }

  return {
    element,
    setValues(next) {
      for (const [name, value] of Object.entries(next)) {
        const row = rows.get(name);
        if (row === undefined) continue;
        row.slider.value = String(value);
        row.box.value = formatValue(value);
        row.committed(row.box.value);
      }
    },
    dispose() {
      element.remove();
    },
  };
}
