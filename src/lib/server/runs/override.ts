/**
 * The check of a trace run's parameter override against the version's document (./schemas.ts,
 * parameterOverrideSchema): the parameter must be one the map layer can vary (the coupling parameter
 * or an element parameter that not every node overrides; any parameter of an ode document) and not the
 * swept one, and the document with the value set must still be a valid model. 400 naming the field.
 */
import { formatIssue, validateModelDocument } from '../../model/index.ts';
import { documentAtSecond } from '../../plot/map-slice.ts';
import { HttpError } from '../http.ts';
import { mapParameterChoices } from '../maps/parameters.ts';
import type { ParameterOverride } from './schemas.ts';

const invalid = (field: string, message: string) =>
  new HttpError(400, 'invalid_input', `${field}: ${message}`, { field, issues: [{ field, message: `${field}: ${message}` }] });

const FIELDS = { parameter: 'settings.override.parameter', value: 'settings.override.value' };

export function checkOverride(document: unknown, o: ParameterOverride, fields: { parameter: string; value: string } = FIELDS): void {
  const { swept, parameters } = mapParameterChoices(document);
  if (o.parameter === swept) throw invalid(fields.parameter, `${o.parameter} is the swept parameter; give the range in settings.from and settings.to instead`);
  if (!parameters.some((p) => p.name === o.parameter)) {
    const names = parameters.map((p) => p.name).join(', ');
    throw invalid(fields.parameter, `the model has no parameter ${o.parameter} that can be set for the whole run${names ? ` (it has: ${names})` : ''}`);
  }
  const changed = documentAtSecond(document, o.parameter, o.value);
  const checked = changed ? validateModelDocument(changed) : null;
  if (!checked || !checked.ok) {
    const why = checked && !checked.ok ? checked.issues.map(formatIssue).join('; ') : 'the value cannot be set';
    throw invalid(fields.value, `the model is not valid with ${o.parameter} = ${o.value}: ${why}`);
  }
}
