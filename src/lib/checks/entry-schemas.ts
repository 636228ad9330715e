/**
 * The entry shapes the engine accepts, per checkpoint kind, as zod/mini schemas. The server parses every entry with
 * them (`evaluate`); the tablet builds its entries from its own controls and judges them with `evaluateOnTablet`,
 * which leaves these schemas (and zod) out of the runner's JavaScript.
 */
import * as z from 'zod/mini';

/** A torque tool as the run knows it; plain strings so it travels as JSON. */
export const TorqueToolContextSchema = z.object({
	kind: z.enum(['preset', 'indicating']),
	min: z.optional(z.string()),
	max: z.string(),
	unit: z.string(),
	accuracyPercent: z.string(),
	/** Preset tools: the value the tool was set to for each pass, in the tool's unit. */
	setTo: z.optional(z.array(z.string()))
});
export type TorqueToolContext = z.infer<typeof TorqueToolContextSchema>;

// zod/mini: the same checks as zod's chained API in a fraction of the bytes, since this module also runs on the
// tablet (the runner's JavaScript budget). Messages are ours, so they read the same in the browser and on the server.
const reading = z.string().check(z.maxLength(100, 'a reading is at most 100 characters'));
const optReading = z.optional(reading);
const unitField = z.optional(z.string().check(z.maxLength(16, 'a unit id is at most 16 characters')));
const imageId = z.string().check(z.regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/, 'not a picture id'));
const tempUnit = z.optional(z.enum(['degC', 'degF']));
const optBool = z.optional(z.boolean());
const list = <T extends z.ZodMiniType>(item: T) => z._default(z.array(item), []);

/** Entry schemas per checkpoint kind. Readings are decimal strings, never JS numbers. */
export const entrySchemas = {
	torque: z.object({
		unit: unitField,
		/** passes[i][fastener label] */
		passes: list(z.record(z.string(), z.object({ reached: optBool, value: optReading }))),
		/** angles[i][fastener label] */
		angles: list(z.record(z.string(), z.object({ turned: optBool, value: optReading })))
	}),
	measure: z.object({
		unit: unitField,
		stage: z.optional(z.string()),
		readings: list(reading),
		partTemperature: optReading,
		temperatureUnit: tempUnit,
		zeroed: optBool,
		/** Resolution of the gauge actually used, in the entry unit. */
		resolution: optReading
	}),
	clearance: z.object({ unit: unitField, reading: optReading }),
	confirm: z.object({ confirmed: optBool, photos: list(imageId) }),
	choice: z.object({ option: z.optional(z.string()) }),
	part: z.object({
		number: optReading,
		serial: optReading,
		lot: optReading,
		quantity: z.optional(z.int().check(z.nonnegative('a quantity is 0 or more')))
	}),
	fluid: z.object({
		specConfirmed: optBool,
		lot: optReading,
		amount: optReading,
		unit: unitField,
		level: z.optional(z.enum(['ok', 'low', 'high'])),
		temperature: optReading,
		temperatureUnit: tempUnit
	}),
	test: z.object({ result: z.optional(z.enum(['pass', 'fail'])), reading: optReading, unit: unitField }),
	text: z.object({ text: z.optional(z.string().check(z.maxLength(20000, 'a text is at most 20,000 characters'))) }),
	photo: z.object({ photos: list(imageId) })
} as const;

/** The entry type of a kind, e.g. `EntryOf<'measure'>`. */
export type EntryOf<K extends keyof typeof entrySchemas> = z.input<(typeof entrySchemas)[K]>;
