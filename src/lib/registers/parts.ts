export const PART_CATEGORIES = ['filter', 'gasket', 'seal', 'sensor', 'fluid', 'fastener', 'other'] as const;
export type PartCategory = (typeof PART_CATEGORIES)[number];

export const PART_CATEGORY_LABELS: Record<PartCategory, string> = {
	filter: 'Filter',
	gasket: 'Gasket',
	seal: 'Seal',
	sensor: 'Sensor',
	fluid: 'Fluid',
	fastener: 'Fastener',
	other: 'Other'
};

export const PART_UNITS = ['ea', 'L'] as const;
