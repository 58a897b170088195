import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  afterRenderEffect,
  inject,
  input,
  viewChild,
} from '@angular/core';
import {
  ArcElement,
  BarController,
  BarElement,
  CategoryScale,
  Chart,
  DoughnutController,
  Legend,
  LinearScale,
  Tooltip,
} from 'chart.js';

// Only the pieces these charts draw, so the lazy chunk carries no unused chart types.
Chart.register(DoughnutController, ArcElement, BarController, BarElement, CategoryScale, LinearScale, Tooltip, Legend);

export interface ChartItem {
  label: string;
  value: number;
  /** The value as the page writes it elsewhere (money, percent). */
  text: string;
}

/**
 * Colours from the Material theme so the chart follows the app's palette. Colour never carries
 * meaning alone: every value is also labelled in the legend, the tooltip and the table below.
 */
const THEME_COLOURS = ['--mat-sys-primary', '--mat-sys-tertiary', '--mat-sys-secondary', '--mat-sys-error', '--mat-sys-outline'];
const FALLBACK_COLOURS = ['#1f5c4a', '#a0522d', '#4a6360', '#8c1d18', '#6f7975'];

export function palette(host: HTMLElement, count: number): string[] {
  const style = getComputedStyle(host);
  const base = THEME_COLOURS.map((name, i) => style.getPropertyValue(name).trim() || FALLBACK_COLOURS[i]);
  return Array.from({ length: count }, (_, i) => base[i % base.length]);
}

/**
 * A doughnut or bar chart drawn with chart.js, with the same figures as a table for people who
 * cannot see the canvas (the canvas itself is hidden from assistive technology).
 */
@Component({
  selector: 'app-share-chart',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <figure>
      <figcaption>{{ caption() }}</figcaption>
      <div class="canvas-box" [class.bar]="kind() === 'bar'">
        <canvas #canvas aria-hidden="true"></canvas>
      </div>
      <table class="figures">
        <caption class="visually-hidden">{{ caption() }}</caption>
        <thead>
          <tr><th scope="col">{{ itemHeading() }}</th><th scope="col" class="number">{{ valueHeading() }}</th></tr>
        </thead>
        <tbody>
          @for (item of items(); track item.label) {
            <tr><th scope="row">{{ item.label }}</th><td class="number">{{ item.text }}</td></tr>
          }
        </tbody>
      </table>
    </figure>
  `,
  styleUrl: './share-chart.scss',
})
export class ShareChart {
  readonly kind = input<'doughnut' | 'bar'>('doughnut');
  readonly caption = input.required<string>();
  readonly itemHeading = input('Item');
  readonly valueHeading = input('Value');
  readonly items = input.required<readonly ChartItem[]>();

  private readonly canvas = viewChild.required<ElementRef<HTMLCanvasElement>>('canvas');
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private chart: Chart | null = null;

  constructor() {
    afterRenderEffect(() => this.draw());
    inject(DestroyRef).onDestroy(() => this.destroyChart());
  }

  private draw(): void {
    const canvas = this.canvas().nativeElement;
    const items = this.items();
    const kind = this.kind();
    this.destroyChart();
    // No 2D context (e.g. a test DOM without canvas support): the table alone tells the figures.
    if (!canvas.getContext('2d')) return;
    const colours = palette(this.host.nativeElement, items.length);
    const byText = new Map(items.map((item) => [item.label, item.text]));
    this.chart = new Chart(canvas, {
      type: kind,
      data: {
        labels: items.map((item) => item.label),
        datasets: [
          {
            label: this.valueHeading(),
            data: items.map((item) => item.value),
            backgroundColor: kind === 'bar' ? colours[0] : colours,
            borderWidth: kind === 'bar' ? 0 : 2,
          },
        ],
      },
      options: {
        responsive: true,
        maintainAspectRatio: false,
        animation: false,
        indexAxis: kind === 'bar' ? 'y' : 'x',
        plugins: {
          legend: { display: kind === 'doughnut', position: 'right' },
          tooltip: {
            callbacks: { label: (context) => `${context.label}: ${byText.get(String(context.label)) ?? context.formattedValue}` },
          },
        },
      },
    });
  }

  private destroyChart(): void {
    this.chart?.destroy();
    this.chart = null;
  }
}
