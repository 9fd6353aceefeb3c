/**
 * The Bode plot of one run: gain over frequency (theory, tolerance band,
 * ideal op-amp, measured, distorted) above phase. Live points are added as
 * they arrive; redraws are batched to the next animation frame so a burst of
 * points costs one draw.
 */
import type { RunKind, TheoryColumns } from '../../app/contract/contract';
import { PointFlag } from '../../app/contract/contract';
import { alignSeries } from '../model/aligned-series';
import { formatHz } from '../model/format';
import { h } from '../dom';
import { FrequencyChart, type Marker } from './frequency-chart';
import { AC_GAIN_BANDS, AC_GAIN_SERIES, AC_PHASE_SERIES, DC_TRANSFER_SERIES, PLOT_COLORS } from './bode-series';

export interface MeasuredColumns {
  stimulus: number[];
  gainDb: number[];
  phaseDeg: number[];
  outputV: number[];
  flags: number[];
}

export interface MarkerSet {
  theoryGainLimitHz?: number;
  measuredGainLimitHz?: number;
  theoryMinus3dbHz?: number[];
  measuredMinus3dbHz?: number[];
}

export { PLOT_COLORS } from './bode-series';

export class BodePlot {
  readonly element: HTMLElement;
  readonly markerList: HTMLUListElement;
  private readonly gainChart: FrequencyChart;
  private readonly phaseChart: FrequencyChart | undefined;
  private theory: TheoryColumns | undefined;
  private measured: MeasuredColumns | undefined;
  private markers: MarkerSet = {};
  private frameRequested = false;
  private dcTheory: { inputV: ArrayLike<number>; outputV: ArrayLike<number> } | undefined;

  constructor(readonly kind: RunKind = 'ac') {
    const gainHost = h('div', { className: 'chart', 'data-chart': 'gain' });
    const phaseHost = h('div', { className: 'chart', 'data-chart': 'phase' });
    this.markerList = h('ul', { className: 'marker-list', 'aria-label': 'Marked points' });
    this.element = h('div', { className: 'bode', 'data-measured-points': '0' }, gainHost, kind === 'ac' ? phaseHost : null, this.markerList);
    // Charts need a width: mount into the document before use (views add the element first).
    if (kind === 'ac') {
      this.gainChart = new FrequencyChart(gainHost, {
        yLabel: 'Gain (dB)',
        yUnit: 'dB',
        height: 300,
        series: AC_GAIN_SERIES,
        bands: AC_GAIN_BANDS,
      });
      this.phaseChart = new FrequencyChart(phaseHost, {
        yLabel: 'Phase (°)',
        yUnit: '°',
        height: 200,
        markerLabels: false,
        series: AC_PHASE_SERIES,
      });
    } else {
      this.gainChart = new FrequencyChart(gainHost, {
        yLabel: 'Output (V)',
        yUnit: 'V',
        height: 360,
        // Log-stage transfer sweeps are log-spaced in input level, so the axis stays logarithmic.
        xLinear: false,
        xUnit: 'V',
        xLabel: 'Input level',
        series: DC_TRANSFER_SERIES,
      });
    }
  }

  /** DC transfer theory (input volts → output volts), computed by the caller from the build's circuit. */
  setDcTheory(inputV: ArrayLike<number>, outputV: ArrayLike<number>): void {
    this.dcTheory = { inputV, outputV };
    this.scheduleDraw();
  }

  setTheory(theory: TheoryColumns | undefined, markers: MarkerSet): void {
    this.theory = theory;
    this.markers = { ...this.markers, ...markers };
    this.scheduleDraw();
  }

  setMeasuredMarkers(markers: Pick<MarkerSet, 'measuredGainLimitHz' | 'measuredMinus3dbHz'>): void {
    this.markers = { ...this.markers, ...markers };
    this.scheduleDraw();
  }

  setMeasured(measured: MeasuredColumns): void {
    this.measured = measured;
    this.scheduleDraw();
  }

  /** Draws now (used by the live path when a frame is due anyway, and by tests). */
  drawNow(): void {
    this.frameRequested = false;
    const measured = this.measured ?? { stimulus: [], gainDb: [], phaseDeg: [], outputV: [], flags: [] };
    const distortedGain = measured.stimulus.map((_, i) => ((measured.flags[i] & PointFlag.distorted) !== 0 ? (this.kind === 'ac' ? measured.gainDb[i] : measured.outputV[i]) : null));
    const markers = this.markerLines();
    if (this.kind === 'ac') {
      const theory = this.theory;
      const fx = theory?.frequencyHz ?? [];
      this.gainChart.setData(
        alignSeries([
          { xs: fx, ys: theory?.gainDb ?? [] },
          { xs: fx, ys: theory?.bandHighDb ?? [] },
          { xs: fx, ys: theory?.bandLowDb ?? [] },
          { xs: fx, ys: theory?.idealGainDb ?? [] },
          { xs: measured.stimulus, ys: measured.gainDb },
          { xs: measured.stimulus, ys: distortedGain },
        ]),
        markers,
      );
      this.phaseChart?.setData(
        alignSeries([
          { xs: fx, ys: theory?.phaseDeg ?? [] },
          { xs: fx, ys: theory?.idealPhaseDeg ?? [] },
          { xs: measured.stimulus, ys: measured.phaseDeg },
        ]),
        markers,
      );
    } else {
      this.gainChart.setData(
        alignSeries([
          { xs: this.dcTheory?.inputV ?? [], ys: this.dcTheory?.outputV ?? [] },
          { xs: measured.stimulus, ys: measured.outputV },
          { xs: measured.stimulus, ys: distortedGain },
        ]),
        markers,
      );
    }
    this.element.dataset.measuredPoints = String(measured.stimulus.length);
    this.element.dataset.distortedPoints = String(distortedGain.filter((v) => v !== null).length);
    this.renderMarkerList(markers);
  }

  destroy(): void {
    this.gainChart.destroy();
    this.phaseChart?.destroy();
  }

  private scheduleDraw(): void {
    if (this.frameRequested) return;
    this.frameRequested = true;
    requestAnimationFrame(() => this.drawNow());
  }

  private markerLines(): Marker[] {
    const lines: Marker[] = [];
    const { theoryGainLimitHz, measuredGainLimitHz, theoryMinus3dbHz = [], measuredMinus3dbHz = [] } = this.markers;
    if (theoryGainLimitHz !== undefined) lines.push({ xHz: theoryGainLimitHz, label: `gain limit (theory) ${formatHz(theoryGainLimitHz)}`, color: PLOT_COLORS.gainLimit });
    if (measuredGainLimitHz !== undefined) lines.push({ xHz: measuredGainLimitHz, label: `gain limit (measured) ${formatHz(measuredGainLimitHz)}`, color: PLOT_COLORS.gainLimitMeasured });
    for (const hz of theoryMinus3dbHz) lines.push({ xHz: hz, label: `−3 dB (theory) ${formatHz(hz)}`, color: PLOT_COLORS.minus3dbTheory });
    for (const hz of measuredMinus3dbHz) lines.push({ xHz: hz, label: `−3 dB (measured) ${formatHz(hz)}`, color: PLOT_COLORS.minus3dbMeasured });
    return lines;
  }

  private renderMarkerList(markers: Marker[]): void {
    const signature = markers.map((m) => m.label).join('|');
    if (this.markerList.dataset.signature === signature) return;
    this.markerList.dataset.signature = signature;
    this.markerList.textContent = '';
    for (const marker of markers) {
      const kind = marker.label.startsWith('gain limit') ? 'gain-limit' : 'minus-3db';
      this.markerList.appendChild(h('li', { 'data-marker': kind }, h('span', { className: 'swatch', 'data-color': marker.color }), marker.label));
    }
  }
}
