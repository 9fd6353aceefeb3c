/**
 * ngspice netlist of a design, for cross-checks and for users who want to
 * run the reference simulator themselves. Op-amps become the SAME macro-model
 * the solver uses (see stamp.ts): a 1 S transconductance into A0 ohms in
 * parallel with 1/(2π·GBW) farads gives A(s) = A0/(1 + s·A0/(2π·GBW)); an
 * optional second stage (1 S into 1 Ω ∥ 1/(2π·f2)) adds the second pole; a
 * unity VCVS copies the result to the output node. SPICE names are
 * case-insensitive, so nodes and elements get sanitised unique names.
 *
 * Op-amp noise for ngspice's .noise: each en or in source is a 1 Ω resistor
 * carrying 1 A DC, whose thermal noise √(4kT·1 Ω) and flicker noise
 * (ngspice's resistor model: current density² KF·I^AF/f, here AF = 2, I = 1 A,
 * KF = 4kT·corner) give exactly √(4kT)·√(1 + corner/f) volts per √Hz; a
 * noiseless controlled source scales it by density/√(4kT) into a voltage in
 * series with the non-inverting input (en) or a current into each input pin
 * (in). A noiseless DC source takes the 1 V off, so operating points are
 * unchanged. The macro-model's internal resistors are noiseless (noisy=0),
 * like the solver's.
 */
import { BOLTZMANN_J_PER_K, ZERO_CELSIUS_K } from './thermal-voltage';
import { isGroundNode, type Design } from './types';

export type SpiceAnalysis =
  | { kind: 'ac'; fromHz: number; toHz: number; pointsPerDecade: number }
  | { kind: 'dc'; inputsV: ArrayLike<number> }
  | { kind: 'op' }
  /** ngspice .noise at the output node, referred to the input source; writes frequency and onoise_spectrum (V/√Hz). */
  | { kind: 'noise'; fromHz: number; toHz: number; pointsPerDecade: number };

export interface SpiceOptions {
  /**
   * When given, a .control block runs the analysis, writes the result there
   * (wrdata/print) and quits (so `ngspice -b` exits 0).
   */
  outputFile?: string;
  /** Ideal op-amps become a VCVS of gain 1e12 (a close stand-in for the nullor). */
  idealOpAmps?: boolean;
}

const IDEAL_VCVS_GAIN = 1e12;

export interface SpiceNames {
  node(name: string): string;
  element(partId: string): string;
  /** Name of the ideal source driving the input node. */
  inputSource: string;
}

const ELEMENT_LETTER = { resistor: 'R', capacitor: 'C', inductor: 'L', diode: 'D', opamp: 'E' } as const;

/** Unique, case-safe SPICE names for the design's nodes and parts. */
export function spiceNames(design: Design): SpiceNames {
  const nodes = new Map<string, string>();
  const usedNodes = new Set<string>(['0']);
  const nodeName = (name: string): string => {
    if (isGroundNode(name)) return '0';
    let safe = nodes.get(name);
    if (safe !== undefined) return safe;
    safe = name.toLowerCase().replace(/[^a-z0-9_]/g, '_');
    if (!/^[a-z]/.test(safe)) safe = `n${safe}`;
    while (usedNodes.has(safe)) safe = `${safe}_`;
    usedNodes.add(safe);
    nodes.set(name, safe);
    return safe;
  };
  const elements = new Map<string, string>();
  const usedElements = new Set<string>();
  for (const part of design.parts) {
    let safe = `${ELEMENT_LETTER[part.type]}_${part.id.toLowerCase().replace(/[^a-z0-9_]/g, '_')}`;
    while (usedElements.has(safe)) safe = `${safe}_`;
    usedElements.add(safe);
    elements.set(part.id, safe);
  }
  design.parts.forEach((part) => part.nodes.forEach(nodeName));
  nodeName(design.input);
  nodeName(design.output);
  return { node: nodeName, element: (id) => elements.get(id) ?? id, inputSource: 'v__input' };
}

function num(value: number): string {
  return String(value);
}

export function toSpiceNetlist(design: Design, analysis: SpiceAnalysis, options: SpiceOptions = {}): string {
  const names = spiceNames(design);
  const node = names.node;
  const lines: string[] = [
    `* ${design.name.replace(/\n/g, ' ')}`,
    '* Netlist written by Rolloff. Op-amps use the single-pole macro-model of Rolloff\'s solver:',
    '* G (1 S) into A0 ohms parallel 1/(2*pi*GBW) farads, then a unity VCVS to the output.',
    `${names.inputSource} ${node(design.input)} 0 DC 0 AC 1`,
  ];
  const models: string[] = [];
  for (const part of design.parts) {
    const name = names.element(part.id);
    switch (part.type) {
      case 'resistor':
      case 'capacitor':
      case 'inductor':
        lines.push(`${name} ${node(part.nodes[0])} ${node(part.nodes[1])} ${num(part.value)}`);
        break;
      case 'diode': {
        const model = `dm_${name.slice(2)}`;
        lines.push(`${name} ${node(part.nodes[0])} ${node(part.nodes[1])} ${model}`);
        models.push(`.model ${model} D(IS=${num(part.model.is)} N=${num(part.model.n)} RS=${num(part.model.rs)})`);
        break;
      }
      case 'opamp': {
        const m = part.model;
        const base = name.slice(2);
        const [plus, minus, out] = part.nodes.map(node);
        lines.push(`* op-amp ${part.id}: A0=${num(m.openLoopGain)} GBW=${num(m.gbw)} Hz${m.secondPoleHz ? ` second pole ${num(m.secondPoleHz)} Hz` : ''}`);
        let sensePlus = plus;
        if (m.inputOffsetV) {
          sensePlus = `${base}__sp`;
          lines.push(`v__${base}_os ${sensePlus} ${plus} DC ${num(m.inputOffsetV)}`);
        }
        const kelvin = design.temperatureC + ZERO_CELSIUS_K;
        if (m.voltageNoiseVPerRtHz) {
          const generator = noiseGenerator(`${base}_en`, m.voltageNoiseVPerRtHz, m.voltageNoiseCornerHz ?? 0, kelvin);
          lines.push(...generator.lines);
          models.push(generator.model);
          const next = `${base}__sn`;
          lines.push(`e__${base}_en ${next} ${sensePlus} ${generator.control} ${num(generator.gain)}`);
          sensePlus = next;
        }
        if (m.currentNoiseAPerRtHz) {
          for (const [pin, pinNode] of [['p', plus], ['m', minus]] as const) {
            if (pinNode === '0') continue;
            const generator = noiseGenerator(`${base}_in${pin}`, m.currentNoiseAPerRtHz, m.currentNoiseCornerHz ?? 0, kelvin);
            lines.push(...generator.lines);
            models.push(generator.model);
            lines.push(`g__${base}_in${pin} 0 ${pinNode} ${generator.control} ${num(generator.gain)}`);
          }
        }
        if (m.inputBiasA) {
          if (plus !== '0') lines.push(`i__${base}_bp ${plus} 0 DC ${num(m.inputBiasA)}`);
          if (minus !== '0') lines.push(`i__${base}_bm ${minus} 0 DC ${num(m.inputBiasA)}`);
        }
        if (options.idealOpAmps || m.ideal) {
          lines.push(`${name} ${out} 0 ${sensePlus} ${minus} ${num(IDEAL_VCVS_GAIN)}`);
          break;
        }
        const p1 = `${base}__p1`;
        lines.push(`g__${base}_1 0 ${p1} ${sensePlus} ${minus} 1`);
        lines.push(`r__${base}_1 ${p1} 0 ${num(m.openLoopGain)} noisy=0`);
        lines.push(`c__${base}_1 ${p1} 0 ${num(1 / (2 * Math.PI * m.gbw))}`);
        let last = p1;
        if (m.secondPoleHz !== undefined) {
          const p2 = `${base}__p2`;
          lines.push(`g__${base}_2 0 ${p2} ${p1} 0 1`);
          lines.push(`r__${base}_2 ${p2} 0 1 noisy=0`);
          lines.push(`c__${base}_2 ${p2} 0 ${num(1 / (2 * Math.PI * m.secondPoleHz))}`);
          last = p2;
        }
        if (m.outputResistanceOhm) {
          const stage = `${base}__o`;
          lines.push(`${name} ${stage} 0 ${last} 0 1`);
          lines.push(`r__${base}_o ${stage} ${out} ${num(m.outputResistanceOhm)} noisy=0`);
        } else lines.push(`${name} ${out} 0 ${last} 0 1`);
        break;
      }
    }
  }
  lines.push(...models);
  lines.push(`.options TEMP=${num(design.temperatureC)} TNOM=${num(design.temperatureC)}`);
  const outputNode = node(design.output);
  const file = options.outputFile;
  switch (analysis.kind) {
    case 'ac':
      lines.push(`.ac dec ${analysis.pointsPerDecade} ${num(analysis.fromHz)} ${num(analysis.toHz)}`);
      if (file) {
        lines.push('.control', 'run', 'set wr_singlescale', 'set wr_vecnames', 'option numdgt=15');
        lines.push(`wrdata ${file} real(v(${outputNode})) imag(v(${outputNode}))`, 'quit', '.endc');
      }
      break;
    case 'op':
      lines.push('.op');
      break;
    case 'noise':
      lines.push(`.noise v(${outputNode}) ${names.inputSource} dec ${analysis.pointsPerDecade} ${num(analysis.fromHz)} ${num(analysis.toHz)}`);
      if (file) {
        lines.push('.control', 'run', 'setplot noise1', 'set wr_singlescale', 'set wr_vecnames', 'option numdgt=15');
        lines.push(`wrdata ${file} onoise_spectrum`, 'quit', '.endc');
      }
      break;
    case 'dc':
      lines.push('.control', 'option numdgt=15');
      lines.push(`foreach level ${Array.from(analysis.inputsV, num).join(' ')}`);
      lines.push(`  alter ${names.inputSource} dc = $level`, '  op', `  print v(${outputNode})${file ? ` >> ${file}` : ''}`, 'end', 'quit', '.endc');
      break;
  }
  lines.push('.end');
  return lines.join('\n') + '\n';
}

/**
 * A 1 Ω, 1 A resistor whose noise voltage is √(4kT·(1 + corner/f)) V/√Hz,
 * read differentially against a noiseless 1 V source; `gain` scales it to
 * `density·√(1 + corner/f)`.
 */
function noiseGenerator(prefix: string, density: number, cornerHz: number, kelvin: number): { lines: string[]; model: string; control: string; gain: number } {
  const fourKT = 4 * BOLTZMANN_J_PER_K * kelvin;
  const node = `${prefix}__g`;
  const reference = `${prefix}__r`;
  return {
    lines: [`i__${prefix} 0 ${node} DC 1`, `r__${prefix} ${node} 0 1 rn_${prefix}`, `v__${prefix} ${reference} 0 DC 1`],
    model: `.model rn_${prefix} R(kf=${num(fourKT * cornerHz)} af=2)`,
    control: `${node} ${reference}`,
    gain: density / Math.sqrt(fourKT),
  };
}
