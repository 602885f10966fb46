/** <ff-figure>: one evidence figure with its number, title, caption, and SVG / PNG export. */
import { LitElement, css, html, nothing } from 'lit';
import { controls, figureFrame } from './styles.ts';
import { emit } from './events.ts';
import { describeFigure } from './figure-list.ts';

export class FfFigure extends LitElement {
  static override properties = {
    number: { type: Number },
    heading: {},
    caption: {},
    name: {},
    figure: { attribute: false },
  };
  declare number: number;
  declare heading: string;
  declare caption: string;
  /** File-name stem for exports, e.g. "curves". */
  declare name: string;
  /** The drawn figure (an SVG, or a figure element holding one). */
  declare figure: Element | null;

  static override styles = [
    controls,
    figureFrame,
    css`
      .plot {
        margin-top: 0.5em;
      }
    `,
  ];

  constructor() {
    super();
    this.number = 1;
    this.heading = '';
    this.caption = '';
    this.name = 'figure';
    this.figure = null;
  }

  protected override willUpdate(changed: Map<string, unknown>): void {
    if (changed.has('figure') || changed.has('heading')) this.describe();
  }

  /** One image with one name for assistive technology (src/ui/figure-list.ts, shared with the report). */
  private describe(): void {
    const svg = this.svg();
    if (svg) describeFigure(svg, this.number, this.heading);
  }

  private svg(): SVGSVGElement | null {
    const f = this.figure;
    if (!f) return null;
    if (f instanceof SVGSVGElement) return f;
    return f.querySelector('svg');
  }

  private export(format: 'svg' | 'png') {
    const svg = this.svg();
    if (svg) emit(this, 'ff-export-figure', { name: this.name, format, svg });
  }

  override render() {
    return html`<figure aria-labelledby="h">
      <div class="top">
        <h3 id="h"><span class="no">Fig. ${this.number}</span>${this.heading}</h3>
        <div class="tools">
          <button type="button" aria-label=${`Export figure ${this.number} as SVG`} ?disabled=${!this.figure} @click=${() => this.export('svg')}>SVG</button>
          <button type="button" aria-label=${`Export figure ${this.number} as PNG`} ?disabled=${!this.figure} @click=${() => this.export('png')}>PNG</button>
        </div>
      </div>
      <div class="plot">${this.figure ?? nothing}</div>
      ${this.caption ? html`<figcaption>${this.caption}</figcaption>` : nothing}
    </figure>`;
  }
}

customElements.define('ff-figure', FfFigure);

declare global {
  interface HTMLElementTagNameMap {
    'ff-figure': FfFigure;
  }
}
