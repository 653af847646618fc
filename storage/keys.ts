// Object key layout. Every key is made of random ids the database stores; a user-supplied file name never
// becomes part of a key (no path tricks, no personal data in storage listings). One prefix per kind, so a
// lifecycle rule or a backup policy can be set per kind:
//
//   artwork-sources/<uuid>.pdf              the uploaded artwork PDF of one revision
//   rasters/<uuid>/<dpi>.png                the rasterised artwork page of one revision at one resolution
//   rasters/<uuid>/preview.png              a small picture of that page for people (drawing excluded areas)
//   prepared/<uuid>/<dpi>/<windows>.bin     the artwork's side of the comparison prepared for one set of windows
//   scans/<uuid>.<tif|png|jpg>              one uploaded press-sheet scan
//   crops/<inspection uuid>/<uuid>-<artwork|scan|difference>.png   crops around one finding
//   tiles/<uuid>/<artwork|scan|difference>.dzi and …_files/<level>/<x>_<y>.<jpeg|png>   deep-zoom pyramids
//   reports/…                               reserved for printed reports
import { randomUUID } from "node:crypto";

export type ScanFormat = "tif" | "png" | "jpg";
export type CropKind = "artwork" | "scan" | "difference";

export const newObjectId = (): string => randomUUID();

/** The uuid part of "artwork-sources/<uuid>.pdf": rasters, the preview and preparations live under the same random id. */
export const sourceObjectId = (sourceKey: string) => sourceKey.replace(/^.*\//, "").replace(/\.pdf$/, "");

export const keys = {
  artworkSource: (id: string) => `artwork-sources/${id}.pdf`,
  raster: (revisionObjectId: string, dpi: number) => `rasters/${revisionObjectId}/${dpi}.png`,
  preview: (revisionObjectId: string) => `rasters/${revisionObjectId}/preview.png`,
  prepared: (revisionObjectId: string, dpi: number, windows: string) => `prepared/${revisionObjectId}/${dpi}/${windows}.bin`,
  scan: (id: string, format: ScanFormat) => `scans/${id}.${format}`,
  cropPrefix: (inspectionObjectId: string) => `crops/${inspectionObjectId}/`,
  crop: (inspectionObjectId: string, findingObjectId: string, kind: CropKind) =>
    `crops/${inspectionObjectId}/${findingObjectId}-${kind}.png`,
  tilesPrefix: (id: string) => `tiles/${id}/`,
};
