/**
 * A figure as plotly's JSON describes it (the open format behind the MIME type
 * application/vnd.plotly.v1+json): traces and a layout, plain data. The figures write it; the
 * widgets hand it to plotly.js, the kernel to the notebook and to the snapshot rasteriser. Only the
 * outline is typed here: plotly's own attribute names and values, unchecked.
 */
export interface Data {
  type?: string;
  [attribute: string]: unknown;
}

/** A plotly attribute object (a marker, an axis, a shape, an annotation, ...). */
export interface Attributes {
  [attribute: string]: unknown;
}

export interface Layout {
  title?: Attributes & { text?: string };
  shapes?: Attributes[];
  annotations?: Attributes[];
  images?: Attributes[];
  [attribute: string]: unknown;
}
