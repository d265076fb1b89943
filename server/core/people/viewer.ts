/** Who is asking: enough of the signed-in user for a service to decide what they may see or do. */
export interface Viewer {
  id: number;
  role: string;
}
