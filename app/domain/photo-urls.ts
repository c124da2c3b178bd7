/** Where a processed photo is served (app/routes/photos.$file.ts): the display size and the thumbnail, both WebP. */
export function photoUrls(id: string): { url: string; thumbUrl: string } {
  return { url: `/photos/${id}.webp`, thumbUrl: `/photos/${id}.thumb.webp` };
}
