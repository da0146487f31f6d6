import { InputError, type Problem } from '../../model/errors.ts';

/**
 * Named errors of the map loader, one per limit the page states. Each carries problems naming the field
 * (scenario path or file), the value found and what is allowed, like every input error of the tool.
 */
export class MapError extends InputError {
  constructor(code: string, problems: Problem[]) {
    super(code, problems);
    this.name = 'MapError';
  }
}

/** A map file larger than the upload limit. */
export class MapFileTooLargeError extends MapError {
  constructor(p: Problem) {
    super('MAP_FILE_TOO_LARGE', [p]);
    this.name = 'MapFileTooLargeError';
  }
}

/** More model cells than the limit (map extent / cell size). */
export class TooManyCellsError extends MapError {
  constructor(p: Problem) {
    super('MAP_TOO_MANY_CELLS', [p]);
    this.name = 'TooManyCellsError';
  }
}

/** A band option that covers no host forest on the map. */
export class BandMissesForestError extends MapError {
  constructor(problems: Problem[]) {
    super('BAND_MISSES_FOREST', problems);
    this.name = 'BandMissesForestError';
  }
}

/** An infested place (wholly or partly) outside the map, or on no habitat. */
export class InfestationOutsideMapError extends MapError {
  constructor(problems: Problem[]) {
    super('INFESTATION_OUTSIDE_MAP', problems);
    this.name = 'InfestationOutsideMapError';
  }
}

/** A CRS the tool cannot read, a geographic (degree) CRS, or one whose distances are distorted. */
export class CrsError extends MapError {
  constructor(p: Problem) {
    super('MAP_CRS_UNREADABLE', [p]);
    this.name = 'CrsError';
  }
}

/** A file that is missing, not a GeoTIFF / GeoJSON, or not the kind of map expected. */
export class MapFileError extends MapError {
  constructor(problems: Problem[]) {
    super('MAP_FILE_INVALID', problems);
    this.name = 'MapFileError';
  }
}

/** Sites or bands that do not fit the map (outside it, a band that folds over itself). */
export class MapPlacementError extends MapError {
  constructor(problems: Problem[]) {
    super('MAP_PLACEMENT_INVALID', problems);
    this.name = 'MapPlacementError';
  }
}

/** Scenario fields a map makes necessary (e.g. non-host pest parameters once the map has non-host forest). */
export class ScenarioMapError extends MapError {
  constructor(problems: Problem[]) {
    super('SCENARIO_INVALID', problems);
    this.name = 'ScenarioMapError';
  }
}
