/** The disposition schemas live in `$lib/quality/dispositions` so the finding page's form validates the same way. */
export * from '../../quality/dispositions';
