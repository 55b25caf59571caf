import { createRequire } from 'node:module';
import path from 'node:path';
import pdfmake from 'pdfmake';
import type { Content, TDocumentDefinitions, TableCell } from 'pdfmake/interfaces.js';
import { isProbabilityEvent, type FaultTreeModel } from '../../shared/model-file.js';
import { contributionsOf } from '../../solver/analysis/index.js';
import type { ReportData } from './report-data.js';
import { curveChartSvg } from './report-chart.js';
import { faultTreeSvg } from './report-tree.js';

/** The Roboto fonts pdfmake ships (Apache License 2.0), read from its package: nothing from a network. */
const FONT_DIR = path.join(path.dirname(createRequire(import.meta.url).resolve('pdfmake/package.json')), 'fonts', 'Roboto');

pdfmake.setFonts({
  Roboto: {
    normal: path.join(FONT_DIR, 'Roboto-Regular.ttf'),
    bold: path.join(FONT_DIR, 'Roboto-Medium.ttf'),
    italics: path.join(FONT_DIR, 'Roboto-Italic.ttf'),
    bolditalics: path.join(FONT_DIR, 'Roboto-MediumItalic.ttf'),
  },
});
pdfmake.setUrlAccessPolicy(() => false);
pdfmake.setLocalAccessPolicy((file) => path.resolve(file).startsWith(FONT_DIR));

/** The caution every report carries. */
export const REPORT_CAUTION =
  'This report supports and does not replace competent judgement. The safety instrumented function must be verified by competent persons under IEC 61511, IEC 61508 and the local rules that apply; the figures are only as good as the data and the model behind them.';

const LISTED_ROWS = 25;

function number(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '-';
  if (value === 0) return '0';
  if (value >= Number.MAX_VALUE / 2) return '∞';
  const magnitude = Math.abs(value);
  return magnitude >= 1e-2 && magnitude < 1e5 ? String(Number(value.toPrecision(digits))) : value.toExponential(digits - 1);
}

function percent(value: number | null): string {
  return value === null ? '-' : `${(value * 100).toFixed(1)} %`;
}

function table(header: string[], rows: TableCell[][], widths?: (string | number)[]): Content {
  return {
    table: { headerRows: 1, widths: widths ?? header.map(() => 'auto'), body: [header.map((text) => ({ text, style: 'tableHeader' })), ...rows] },
    layout: 'lightHorizontalLines',
    style: 'table',
  };
}

function heading(text: string): Content {
  return { text, style: 'heading' };
}

function treeOutline(model: FaultTreeModel): Content {
  const lines: Content[] = [];
  const visit = (id: string, depth: number, seen: Set<string>) => {
    const gate = model.gates.find((candidate) => candidate.id === id);
    const event = model.events.find((candidate) => candidate.id === id);
    const label = gate?.label ?? event?.label;
    const kind = gate ? (gate.type === 'atLeast' ? `at least ${gate.k} of ${gate.inputs.length}` : gate.type.toUpperCase()) : 'event';
    lines.push({ text: `${id}${label ? ` (${label})` : ''}: ${kind}`, margin: [depth * 14, 0, 0, 1], fontSize: 8.5 });
    if (!gate || seen.has(id)) return;
    const inner = new Set(seen).add(id);
    for (const input of gate.inputs) visit(input, depth + 1, inner);
  };
  visit(model.top, 0, new Set());
  for (const group of model.ccf ?? []) {
    lines.push({ text: `common cause ${group.id}: ${group.members.join(', ')}, beta ${group.beta}${group.model === 'pds' ? ' (PDS)' : ''}`, fontSize: 8.5, margin: [0, 2, 0, 0] });
  }
  return { stack: lines, margin: [0, 0, 0, 6] };
}

function parameterTable(model: FaultTreeModel, sourceNote: string): Content[] {
  const rows: TableCell[][] = model.events.map((event) => {
    if (isProbabilityEvent(event)) return [event.id, event.label ?? '', `P = ${number(event.probability)}`, '-', '-', '-', '-', '-', event.source ?? sourceNote];
    const test = event.proofTest;
    const partial = event.partialTest;
    return [
      event.id,
      event.label ?? '',
      number(event.lambdaDU),
      number(event.lambdaDD ?? 0),
      number(event.lambdaS ?? null),
      number(event.mttrHours ?? 0),
      test ? `${number(test.intervalHours)} h${test.coverage !== undefined ? `, PTC ${percent(test.coverage)}` : ''}${partial ? `; partial ${number(partial.intervalHours)} h at ${percent(partial.coverage)}` : ''}` : 'none',
      `${event.deviceType ?? '-'} / ${event.systematicCapability !== undefined ? `SC ${event.systematicCapability}` : '-'}`,
      event.source ?? sourceNote,
    ];
  });
  const content: Content[] = [table(['Event', 'Label', 'λDU /h', 'λDD /h', 'λS /h', 'MTTR h', 'Proof test', 'Type / SC', 'Source'], rows, [38, '*', 34, 34, 34, 26, 70, 34, 70])];
  if ((model.ccf ?? []).length > 0) {
    content.push(
      table(
        ['Common-cause group', 'Members', 'Model', 'β', 'βD', 'Source'],
        (model.ccf ?? []).map((group) => [group.id, group.members.join(', '), group.model, number(group.beta), number(group.betaD ?? group.beta), group.source ?? sourceNote]),
      ),
    );
  }
  return content;
}

/** The verification report of one solve as a PDF document definition (pdfmake). */
export function reportDefinition(data: ReportData, generatedAt: Date, generatedBy: string): TDocumentDefinitions {
  const { result, sif, analysis, model } = data;
  const low = result.demand === 'low';
  const measureName = low ? 'PFDavg' : 'PFH (per hour)';
  const measure = low ? result.pfdAvg : result.pfh;
  const target = low ? sif.derivedTarget.pfdAvg : sif.derivedTarget.pfh;
  const meets = target === null ? null : sif.derivedTarget.limitInclusive ? measure <= target : measure < target;
  const source = data.revision ? `model revision ${data.revision.number}` : `model draft version ${data.solve.draftVersion}`;
  const labels = new Map<string, string>();
  if (model.kind === 'fault-tree') for (const item of [...model.events, ...model.gates, ...(model.ccf ?? [])]) labels.set(item.id, item.label ?? item.id);

  const methodRows: TableCell[][] = [];
  for (const simplified of result.simplified) {
    methodRows.push([`Simplified: ${simplified.formula}`, simplified.scope, number(low ? simplified.pfdAvg : simplified.pfh), simplified.deviation === null ? '-' : `${(simplified.deviation * 100).toFixed(1)} %`, simplified.warnings.join('; ') || '-']);
  }
  for (const method of data.methods) {
    const value = low ? method.result.pfdAvg : method.result.pfh;
    const interval = method.result.interval ? (low ? method.result.interval.pfdAvg : method.result.interval.pfh) : null;
    methodRows.push([
      method.method === 'montecarlo' ? `Monte Carlo (${method.result.samples ?? '?'} missions)` : `Exact: ${method.result.method}`,
      'whole function',
      number(value),
      method.solveId === data.solve.id ? 'this solve' : `solve ${method.solveId.slice(0, 8)}`,
      interval ? `${Math.round(interval.level * 100)} % interval ${number(interval.lower)} to ${number(interval.upper)}` : method.result.algorithm,
    ]);
  }
  if (!data.methods.some((method) => method.method === 'montecarlo')) methodRows.push(['Monte Carlo', 'whole function', 'not run', '-', 'no Monte Carlo solve of this content']);

  const contributions = contributionsOf(result, analysis.constraints ?? [], labels);
  const content: Content[] = [
    { text: 'Verification report', style: 'title' },
    { text: `${sif.tag}: ${sif.title}`, style: 'subtitle' },
    { text: REPORT_CAUTION, style: 'caution' },
    heading('Safety instrumented function'),
    table(
      ['Field', 'Value'],
      [
        ['Project', data.projectName],
        ['Tag', sif.tag],
        ['Title', sif.title],
        ['Hazardous event', sif.hazardousEvent],
        ['Demand mode', sif.demandMode],
        ['Target', `${sif.target.kind} ${number(sif.target.value)} (SIL ${sif.derivedTarget.sil}${target !== null ? `, ${measureName} ${sif.derivedTarget.limitInclusive ? '<=' : '<'} ${number(target)}` : ''})`],
        ['Target source', `SIF register record, version ${sif.version}, owner ${sif.ownerDisplayName}; the figure from the hazard and risk analysis as entered`],
        ['Record status', sif.status],
        ['Mission', `${number(model.mission.hours)} h (${number(model.mission.hours / 8760)} years), ${model.mission.demand} demand`],
      ],
      [110, '*'],
    ),
    heading('Model'),
    { text: `${data.modelName} (${model.kind}), ${source}, content ${data.solve.contentHash.slice(0, 16)}`, style: 'body' },
  ];
  if (model.kind === 'fault-tree') {
    const picture = faultTreeSvg(model);
    content.push(
      { text: 'Model picture', style: 'subheading' },
      { svg: picture.svg, width: Math.min(515, picture.width) },
      ...(picture.truncated ? [{ text: 'The picture is cut at its width; the structure below lists every item.', style: 'note' } as Content] : []),
      { text: 'Model structure', style: 'subheading' },
      treeOutline(model),
      { text: 'Parameters', style: 'subheading' },
      ...parameterTable(model, source),
    );
  } else {
    content.push({ text: `State model: ${model.states.length} states, ${model.transitions.length} transitions, ${(model.parts ?? []).length} independent parts.`, style: 'body' });
  }
  content.push(
    heading('Results'),
    table(
      ['Measure', 'Value'],
      [
        [measureName, number(measure)],
        ['Target', target === null ? '-' : number(target)],
        ['Verdict', meets === null ? '-' : meets ? `meets the target (margin ${number(target! / Math.max(measure, Number.MIN_VALUE))} x)` : `does not meet the target (${number(measure / target!)} x over)`],
        ['RRF', low ? number(result.rrf) : '-'],
        ['PFDmax', number(result.pfdMax)],
        ['SIL by the probability result', result.sil === null ? 'below SIL 1' : `SIL ${result.sil}`],
        ['SIL claim (all limits)', analysis.claim.sil === null ? 'none' : `SIL ${analysis.claim.sil}`],
      ],
      [150, '*'],
    ),
    { text: 'Methods side by side', style: 'subheading' },
    table(['Method', 'Scope', measureName, 'Deviation / solve', 'Notes'], methodRows, [120, 60, 50, 55, '*']),
    ...curveCharts(result, target),
    heading('Weakest link'),
    table(['Item', 'Kind', 'Share of PFDavg', 'Contribution'], contributions.slice(0, LISTED_ROWS).map((row) => [row.label === row.id ? row.id : `${row.id} (${row.label})`, row.kind, percent(row.share), number(row.pfdAvg)])),
    { text: 'Minimal cut sets', style: 'subheading' },
    table(['#', 'Events', 'Order', 'Probability', 'Share'], result.cutSets.slice(0, LISTED_ROWS).map((set, index) => [String(index + 1), set.events.join(', '), String(set.order), number(set.probability), percent(set.share)])),
    { text: 'Importance measures', style: 'subheading' },
    table(['Item', 'Kind', 'Birnbaum', 'Fussell-Vesely', 'RAW', 'RRW'], result.importance.slice(0, LISTED_ROWS).map((item) => [item.id, item.kind, number(item.birnbaum), number(item.fussellVesely), number(item.riskAchievementWorth), number(item.riskReductionWorth)])),
    heading('Architectural constraints and the SIL claim'),
  );
  if (analysis.constraints) {
    content.push(
      table(
        ['Subsystem', 'Voting', 'HFT', 'SFF', 'Type', 'Route 1H', 'IEC 61511', 'SC'],
        analysis.constraints.map((row) => [
          row.label === row.id ? row.id : `${row.id} (${row.label})`,
          row.voting ?? '-',
          String(row.hft),
          percent(row.sff),
          `${row.deviceType}${row.deviceTypeAssumed ? ' (assumed)' : ''}`,
          row.route1HMaxSil === null ? 'not allowed' : `SIL ${row.route1HMaxSil}`,
          `SIL ${row.iec61511MaxSil}`,
          row.systematicCapability === null ? '-' : `SC ${row.systematicCapability}`,
        ]),
      ),
    );
  }
  content.push(
    table(['Limit', 'Rule set', 'Allows', 'Why'], analysis.claim.limits.map((limit) => [limit.subsystem ?? 'function', limit.source, limit.sil === null ? 'none' : `SIL ${limit.sil}`, limit.reason]), [60, 130, 40, '*']),
    { text: `SIL claim: ${analysis.claim.sil === null ? 'none' : `SIL ${analysis.claim.sil}`} (the lowest of the limits above).`, style: 'body' },
    heading('Spurious trips'),
  );
  if (analysis.spuriousTrip) {
    const trip = analysis.spuriousTrip;
    content.push(
      { text: `Spurious trip rate ${number(trip.ratePerHour)} per hour; MTTFspurious ${trip.mttfSpuriousHours === null ? 'unbounded' : `${number(trip.mttfSpuriousHours)} h (${number(trip.mttfSpuriousHours / 8760)} years)`}.`, style: 'body' },
      table(['Subsystem', 'Voting', 'Trips per hour'], trip.subsystems.map((row) => [row.label, row.voting ?? '-', number(row.ratePerHour)])),
      { text: `Method: ${trip.method}.`, style: 'note' },
    );
  } else {
    content.push({ text: 'Not computed for a state model.', style: 'body' });
  }
  const assumptions = [...result.warnings, ...result.simplified.flatMap((item) => item.warnings.map((warning) => `${item.scope}: ${warning}`)), ...analysis.notes, ...(analysis.constraints ?? []).flatMap((row) => row.notes.map((note) => `${row.id}: ${note}`)), ...(analysis.spuriousTrip?.notes ?? [])];
  content.push(
    heading('Assumptions and warnings'),
    assumptions.length > 0 ? { ul: assumptions, style: 'body' } : { text: 'None stated by the solver.', style: 'body' },
    heading('Review and approvals'),
    table(
      ['Item', 'Record'],
      [
        ['SIF record status', sif.status],
        ['Model revision', data.revision ? `revision ${data.revision.number}, issued by ${data.revision.issuedBy} on ${data.revision.issuedAt.toISOString().slice(0, 10)}: ${data.revision.reason}` : `draft version ${data.solve.draftVersion} (not an issued revision)`],
        ['Solve', `${data.solve.id}, requested by ${data.requestedBy} on ${data.solve.createdAt.toISOString().slice(0, 16).replace('T', ' ')} UTC`],
        ['Solver', `version ${result.solverVersion}; ${result.algorithm}`],
        ['Report', `generated ${generatedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC by ${generatedBy}`],
      ],
      [110, '*'],
    ),
    { text: 'Review rounds', style: 'subheading' },
    data.reviewRounds.length > 0
      ? table(
          ['Revision', 'Status', 'Requested', 'Decided', 'Comment'],
          data.reviewRounds.map((round) => [
            String(round.revision),
            round.status,
            `${round.requestedBy}, ${round.requestedAt.toISOString().slice(0, 10)}: ${round.message}`,
            round.decidedBy ? `${round.decidedBy}, ${round.decidedAt?.toISOString().slice(0, 10) ?? ''}` : '-',
            round.decisionComment || '-',
          ]),
          [40, 45, '*', 90, 110],
        )
      : { text: 'No review round of this model has been requested.', style: 'body' },
    { text: 'Review comments', style: 'subheading' },
    data.reviewComments.length > 0
      ? table(
          ['Revision', 'Severity', 'Status', 'Pinned to', 'Author', 'Comment'],
          data.reviewComments.map((comment) => [String(comment.revision), comment.severity, comment.status, comment.pinnedTo, comment.author, comment.body]),
          [40, 45, 40, 85, 60, '*'],
        )
      : { text: 'No review comments on this model.', style: 'body' },
    { text: REPORT_CAUTION, style: 'caution', margin: [0, 12, 0, 0] },
  );

  return {
    info: { title: `Verification report ${sif.tag}`, subject: sif.title, creator: 'Proofline', producer: 'Proofline' },
    pageSize: 'A4',
    pageMargins: [40, 48, 40, 48],
    defaultStyle: { font: 'Roboto', fontSize: 9 },
    footer: (current, count) => ({ text: `${sif.tag} · ${source} · solver ${result.solverVersion} · page ${current} of ${count}`, alignment: 'center', fontSize: 7, color: '#555', margin: [0, 16, 0, 0] }),
    content,
    styles: {
      title: { fontSize: 18, bold: true, margin: [0, 0, 0, 2] },
      subtitle: { fontSize: 12, margin: [0, 0, 0, 8] },
      heading: { fontSize: 12, bold: true, margin: [0, 12, 0, 4] },
      subheading: { fontSize: 10, bold: true, margin: [0, 6, 0, 3] },
      tableHeader: { bold: true, fontSize: 8 },
      table: { fontSize: 8, margin: [0, 0, 0, 6] },
      body: { margin: [0, 0, 0, 4] },
      note: { fontSize: 7.5, color: '#444', margin: [0, 0, 0, 6] },
      caution: { fontSize: 8.5, italics: true, color: '#7a2e00', margin: [0, 0, 0, 6] },
    },
  };
}

/** The verification report as PDF bytes. */

/**
 * The report's charts. Low demand: PFD(t) against the bands of IEC 61508-1:2010 Table 2. High and
 * continuous demand: w(t) and its average, the PFH, against the bands of Table 3, then PFD(t) for
 * information; a result without w(t) says so instead.
 */
export function curveCharts(result: ReportData['result'], target: number | null): Content[] {
  const { hours, pfd, frequency } = result.curve;
  const low = result.demand === 'low';
  const pfdChart: Content[] = [
    { text: 'PFD(t) over the mission', style: 'subheading' },
    { svg: curveChartSvg({ hours, values: pfd, average: result.pfdAvg, bands: low ? 'low' : null, target: low ? target : null }), width: 500 },
    { text: `Blue: PFD(t); green: PFDavg${low ? '; red dashed: target; shaded: SIL bands (IEC 61508-1:2010 Table 2)' : ''}. Log axis.`, style: 'note' },
  ];
  if (low) return pfdChart;
  const pfhChart: Content[] = frequency
    ? [
        { text: 'PFH: failure frequency w(t) over the mission', style: 'subheading' },
        { svg: curveChartSvg({ hours, values: frequency, average: result.pfh, bands: 'high', target }), width: 500 },
        { text: 'Blue: w(t) per hour; green: its average, the PFH; red dashed: target; shaded: SIL bands (IEC 61508-1:2010 Table 3). Log axis.', style: 'note' },
      ]
    : [
        { text: 'PFH: failure frequency w(t) over the mission', style: 'subheading' },
        { text: `This result has no w(t) curve: the engine that produced it does not compute one. Its PFH is ${result.pfh.toExponential(2)} per hour.`, style: 'note' },
      ];
  return [...pfhChart, ...pfdChart];
}

export async function reportPdf(data: ReportData, generatedAt: Date, generatedBy: string): Promise<Buffer> {
  return pdfmake.createPdf(reportDefinition(data, generatedAt, generatedBy)).getBuffer();
}
