/**
 * The measurement core's public face. Frames: bed mm (origin front-left, +X right, +Y away from the operator);
 * image px (origin top-left, +y down).
 */
export * from './contract';
export { analyzePoints, type AnalyzeOptions } from './analyze';
export { GeometryInputError } from './errors';
export { patternToMm, inToMm, mmToIn, type PatternMm } from './units';
export { PRESETS, presetById, type Preset, type PresetSize } from './presets';
export { positionLabel, columnLetters, columnIndex, parseLabel, cellName } from './labels';
export { radialToleranceMm, clearanceHoleMm, ISO_273, ASME_B18_2_8, FASTENERS, iso286PinFit } from './fits';
export { projectBedPoint, distortPx, undistortPx, lookAt, defaultFocalPx, type Camera, type Lens, type Pose } from './camera';
export { buildLattice, type Lattice, type NominalPosition } from './lattice';
export { accessoryFit, boardFit, pinExcess, type AccessoryPin, type AccessoryFitInput, type AccessoryFitResult } from './accessory';
export { compareReports, type Comparison, type PositionChange, type PanelChange } from './compare';
export { makeScene, type Scene, type SceneSpec, type SceneTruth } from './synthetic';
