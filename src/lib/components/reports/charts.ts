import type { ColumnFormat, Row } from './format';

// How each report is drawn. Colours are the app's palette (tailwind.config.ts).
export const COLOURS = {
	moss: '#3d6b4f',
	copper: '#a64b24',
	amber: '#9a6a00',
	brick: '#a12f2f',
	ink: '#47555d',
	faint: '#8a969c'
};

export interface SeriesSpec {
	key: string;
	colour: string;
	kind: 'bar' | 'line';
	/** Right-hand axis, for a rate beside amounts. */
	right?: boolean;
	stack?: string;
	dashed?: boolean;
}

export interface ChartSpec {
	/** The column that names each bar or point. */
	x: string;
	xLabel?: (row: Row) => string;
	left: ColumnFormat;
	right?: ColumnFormat;
	horizontal?: boolean;
	series: SeriesSpec[];
}

/** Outcomes by month and by kind of unit stack the same three answers. */
const OUTCOME_SERIES: SeriesSpec[] = [
	{ key: 'repaired', colour: COLOURS.moss, kind: 'bar', stack: 'answers' },
	{ key: 'replaced', colour: COLOURS.copper, kind: 'bar', stack: 'answers' },
	{ key: 'declined', colour: COLOURS.brick, kind: 'bar', stack: 'answers' }
];

export const CHARTS: Record<string, ChartSpec> = {
	revenue: {
		x: 'month',
		left: 'money',
		series: [
			{ key: 'parts', colour: COLOURS.copper, kind: 'bar', stack: 'revenue' },
			{ key: 'labour', colour: COLOURS.moss, kind: 'bar', stack: 'revenue' },
			{ key: 'other', colour: COLOURS.amber, kind: 'bar', stack: 'revenue' }
		]
	},
	margin: {
		x: 'month',
		left: 'money',
		right: 'percent',
		series: [
			{ key: 'parts', colour: COLOURS.copper, kind: 'bar', stack: 'profit' },
			{ key: 'labour', colour: COLOURS.moss, kind: 'bar', stack: 'profit' },
			{ key: 'other', colour: COLOURS.amber, kind: 'bar', stack: 'profit' },
			{ key: 'marginPercent', colour: COLOURS.ink, kind: 'line', right: true }
		]
	},
	approval: {
		x: 'month',
		left: 'count',
		right: 'percent',
		series: [
			{ key: 'approved', colour: COLOURS.moss, kind: 'bar', stack: 'sent' },
			{ key: 'declined', colour: COLOURS.brick, kind: 'bar', stack: 'sent' },
			{ key: 'unanswered', colour: COLOURS.faint, kind: 'bar', stack: 'sent' },
			{ key: 'ratePercent', colour: COLOURS.ink, kind: 'line', right: true }
		]
	},
	outcomes: {
		x: 'month',
		left: 'count',
		series: OUTCOME_SERIES
	},
	'outcomes-by-kind': {
		x: 'kind',
		left: 'count',
		horizontal: true,
		series: OUTCOME_SERIES
	},
	'days-to-approval': {
		x: 'month',
		left: 'count',
		right: 'days',
		series: [
			{ key: 'withinDay', colour: COLOURS.moss, kind: 'bar', stack: 'answers' },
			{ key: 'oneToThree', colour: COLOURS.amber, kind: 'bar', stack: 'answers' },
			{ key: 'threeToSeven', colour: COLOURS.copper, kind: 'bar', stack: 'answers' },
			{ key: 'overWeek', colour: COLOURS.brick, kind: 'bar', stack: 'answers' },
			{ key: 'averageDays', colour: COLOURS.ink, kind: 'line', right: true }
		]
	},
	technicians: {
		x: 'technician',
		left: 'money',
		right: 'ratio',
		series: [
			{ key: 'grossProfit', colour: COLOURS.moss, kind: 'bar' },
			{ key: 'efficiency', colour: COLOURS.copper, kind: 'line', right: true }
		]
	},
	'margin-lost': {
		x: 'job',
		xLabel: (row) => `#${row.job} ${row.customer ?? ''}`.trim(),
		left: 'money',
		horizontal: true,
		series: [{ key: 'marginLost', colour: COLOURS.brick, kind: 'bar' }]
	}
};
