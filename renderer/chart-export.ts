// Turning the charts' SVG into a PNG picture in the window: the SVG is drawn onto a canvas at twice the
// screen size (the page's content security policy allows data: images) and read back as base64.

export async function svgToPngBase64(svg: string, width: number, height: number, scale = 2): Promise<string> {
  const url = `data:image/svg+xml;base64,${btoa(unescape(encodeURIComponent(svg)))}`;
  const img = new Image();
  await new Promise<void>((resolve, reject) => {
    img.onload = () => resolve();
    img.onerror = () => reject(new Error('the chart could not be drawn as a picture'));
    img.src = url;
  });
  const canvas = document.createElement('canvas');
  canvas.width = Math.round(width * scale);
  canvas.height = Math.round(height * scale);
  const ctx = canvas.getContext('2d');
  if (!ctx) throw new Error('this window cannot draw pictures (no 2D canvas)');
  ctx.scale(scale, scale);
  ctx.drawImage(img, 0, 0, width, height);
  return canvas.toDataURL('image/png').replace(/^data:image\/png;base64,/, '');
}
