/** <ff-sparkline>: a run's training loss as a small line. */
import { LitElement, css, html, svg } from 'lit';
import { sparklinePath } from './progress-view.ts';

export class FfSparkline extends LitElement {
  static override properties = {
    values: { attribute: false },
    color: {},
    label: {},
  };
  declare values: number[];
  declare color: string;
  declare label: string;

  static override styles = css`
    :host {
      display: inline-block;
      line-height: 0;
    }
    svg {
      width: 100%;
      height: 100%;
      overflow: visible;
    }
  `;

  constructor() {
    super();
    this.values = [];
    this.color = 'currentColor';
    this.label = 'training loss';
  }

  override render() {
    const d = sparklinePath(this.values, 120, 28);
    return html`<svg viewBox="0 0 120 28" preserveAspectRatio="none" role="img" aria-label=${this.label}>
      ${svg`<line x1="0" y1="27.5" x2="120" y2="27.5" stroke="#d4c8b0" stroke-width="1" />`}
      ${d ? svg`<path d=${d} fill="none" stroke=${this.color} stroke-width="1.8" stroke-linejoin="round" vector-effect="non-scaling-stroke" />` : null}
    </svg>`;
  }
}

customElements.define('ff-sparkline', FfSparkline);

declare global {
  interface HTMLElementTagNameMap {
    'ff-sparkline': FfSparkline;
  }
}
