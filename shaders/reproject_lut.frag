#version 330 core
// Cube faces -> dome master or panorama, one sample per pixel, through a table of each
// output pixel's atlas point that reproject.frag wrote with RECORD_LUT for the same
// output (viewer/export/immersive.py keeps it while the output stays the same). The
// fetch is at the very coordinates reproject.frag computes, so the pixels are its own,
// bit for bit, without its trigonometry.
uniform sampler2D u_atlas;     // the six faces side by side, 3 across and 2 down
uniform sampler2D u_lut;       // per output pixel: the atlas point, or -1 off the output
uniform vec4 u_outside;        // colour outside the dome's circle (premultiplied)
uniform vec2 u_out_size;       // output pixels (W, H)
uniform vec2 u_origin;         // where the output starts in the framebuffer (px)
uniform bool u_rows_up;        // rows counted from the bottom (a window's screen)

out vec4 f_color;

void main() {
    vec2 frag = gl_FragCoord.xy - u_origin;
    if (u_rows_up) frag.y = u_out_size.y - frag.y;
    vec2 at = texelFetch(u_lut, ivec2(floor(frag)), 0).xy;
    f_color = at.x < 0.0 ? u_outside : textureLod(u_atlas, at, 0.0);
}
