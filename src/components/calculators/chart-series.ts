/** One line of a {@link CalculatorChart}: its points against the common x, the y axis it uses and how it is drawn. */
export interface ChartSeries {
  label: string
  /** Which y axis the line is read against. */
  axis: 'left' | 'right'
  /** Points with x increasing; a repeated x draws a vertical jump (e.g. a normal shock). */
  points: { x: number; y: number }[]
  /** A colour role of Isentrope's palette. */
  colour: 'ink' | 'copper' | 'muted'
  dashed?: boolean
  /** Draw the points as dots with no line between them (e.g. the operating point on a curve). */
  marker?: boolean
}
