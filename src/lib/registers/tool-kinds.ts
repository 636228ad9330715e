/** Kinds of tool in the register, and how each is named on screen. */
export const TOOL_KINDS = [
	'torque_click',
	'torque_indicating',
	'bore_gauge',
	'micrometer',
	'caliper',
	'thermometer'
] as const;
export type ToolKind = (typeof TOOL_KINDS)[number];

export const TOOL_KIND_LABELS: Record<ToolKind, string> = {
	torque_click: 'Torque wrench, preset / click',
	torque_indicating: 'Torque wrench, indicating',
	bore_gauge: 'Bore gauge',
	micrometer: 'Micrometer',
	caliper: 'Caliper',
	thermometer: 'Thermometer'
};

/** Units a tool's range and resolution may be given in (the procedure language's spellings). */
export const TOOL_UNITS = ['N·m', 'lbf·ft', 'lbf·in', 'mm', 'µm', 'in', '°C', '°F'] as const;
export type ToolUnit = (typeof TOOL_UNITS)[number];

/** Which units make sense for which kind: torque tools measure torque, thermometers temperature, the rest length. */
export const UNITS_FOR_KIND: Record<ToolKind, readonly ToolUnit[]> = {
	torque_click: ['N·m', 'lbf·ft', 'lbf·in'],
	torque_indicating: ['N·m', 'lbf·ft', 'lbf·in'],
	bore_gauge: ['mm', 'µm', 'in'],
	micrometer: ['mm', 'µm', 'in'],
	caliper: ['mm', 'µm', 'in'],
	thermometer: ['°C', '°F']
};

/** A lab calibration (certificate, as-left, next due) or an in-house check between calibrations (as-found only). */
export const CALIBRATION_KINDS = ['calibration', 'check'] as const;
export type CalibrationKind = (typeof CALIBRATION_KINDS)[number];

export const TOLERANCE_RESULTS = ['in', 'out'] as const;
export type ToleranceResult = (typeof TOLERANCE_RESULTS)[number];
