/**
 * The scenario form in one import: its layout (form-layout.ts: sections, row tables, input kinds), reading
 * (form-read.ts), writing (form-write.ts), row actions and limits (form-rows.ts) and number reading
 * (form-number.ts). Those modules import the layout, never this file, so the form has no import circle.
 */
export * from './form-layout.ts';
export { extraSettings, scenarioToForm } from './form-write.ts';
export { formToScenario, type FormNote } from './form-read.ts';
export { readNumber, readNumberList, readNumberText, type NumberReading } from './form-number.ts';
export { applyRowAction, formStateFromBody, FormTooLargeError, MAX_FORM_INPUTS, parseRowAction, rowIndices, type RowAction } from './form-rows.ts';
