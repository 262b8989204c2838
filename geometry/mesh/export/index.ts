/**
 * Mesh export: VTK XML (.vtu, default), legacy VTK ASCII (.vtk) and the TWMESH binary format.
 * All writers return a Uint8Array and are deterministic (same mesh and options → same bytes).
 */
export { writeVtu, VTK_TETRA, VTK_QUADRATIC_TETRA } from './vtu';
export type { VtuOptions, VtuEncoding, NamedArray, NumericArray } from './vtu';
export { writeVtkLegacy } from './vtk';
export type { VtkLegacyOptions } from './vtk';
export { encodeMeshBinary, decodeMeshBinary, MeshBinaryError, MESH_BINARY_MAGIC, MESH_BINARY_VERSION } from './binary';
