import { html, nothing, type TemplateResult } from 'lit';
import { ASSUMED_FREQUENCY_TAG } from '../../../src/scenario/units.js';

/**
 * A table heading over times in seconds. When the run's scenario gave no nominal frequency the
 * seconds rest on the default, and the heading says so on a second line (the columns stay as
 * narrow as their numbers).
 */
export function secondsHeading(label: string, nominalFrequencyAssumed: boolean): TemplateResult {
  return html`${label}${nominalFrequencyAssumed ? html`<br /><span class="assumed-frequency">${ASSUMED_FREQUENCY_TAG}</span>` : nothing}`;
}
