// gcode-toolpath ships no types. Only what the cross-check uses is declared.
declare module "gcode-toolpath" {
  interface ToolpathPoint {
    x: number;
    y: number;
    z: number;
  }
  interface ToolpathModal {
    motion: string;
    wcs: string;
    plane: "G17" | "G18" | "G19";
    units: "G20" | "G21";
    distance: "G90" | "G91";
    tool: number;
    [key: string]: unknown;
  }
  interface ToolpathOptions {
    position?: Partial<ToolpathPoint>;
    modal?: Partial<ToolpathModal>;
    /** A straight move; points in millimetres whatever the program's units. */
    addLine?: (modal: ToolpathModal, v1: ToolpathPoint, v2: ToolpathPoint) => void;
    /**
     * An arc. Points are in the selected plane's own axes (G17: x=X y=Y z=Z; G18: x=Z y=X z=Y; G19: x=Y y=Z z=X);
     * v0 is the centre.
     */
    addArcCurve?: (modal: ToolpathModal, v1: ToolpathPoint, v2: ToolpathPoint, v0: ToolpathPoint) => void;
  }
  class Toolpath {
    constructor(options?: ToolpathOptions);
    loadFromStringSync(source: string, callback?: (data: unknown, index: number) => void): unknown[];
  }
  export default Toolpath;
}
