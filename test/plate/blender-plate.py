# The independent reference for plate lights: Blender renders a plate (an invented one: a glowing
# ball carried past a post, on black) with Cycles on the CPU, and the same plate without the post;
# it reports where it projects the ball's centre at every frame (world_to_camera_view) and the
# ball's apparent radius.
#
# Run: blender -b --factory-startup --python blender-plate.py -- OUT_DIR
# Writes OUT_DIR/plate.####.exr, OUT_DIR/clear.####.exr, OUT_DIR/reference.json

import json
import math
import os
import sys

import bpy
from bpy_extras.object_utils import world_to_camera_view

out = sys.argv[sys.argv.index('--') + 1]
os.makedirs(out, exist_ok=True)
W, H = 320, 180
FIRST, LAST = 1, 20
RADIUS = 0.3

bpy.ops.wm.read_factory_settings(use_empty=True)
scene = bpy.context.scene
scene.render.resolution_x = W
scene.render.resolution_y = H
scene.render.resolution_percentage = 100
scene.render.fps = 24
scene.frame_start = FIRST
scene.frame_end = LAST
world = bpy.data.worlds.new('Black')
world.color = (0.0, 0.0, 0.0)
scene.world = world

cam_data = bpy.data.cameras.new('Cam')
cam_data.lens = 35.0
cam_data.sensor_width = 36.0
cam_data.sensor_fit = 'HORIZONTAL'
cam = bpy.data.objects.new('Cam', cam_data)
scene.collection.objects.link(cam)
scene.camera = cam
cam.location = (0.0, 0.0, 0.0)
cam.rotation_euler = (math.radians(90.0), 0.0, 0.0)

bpy.ops.mesh.primitive_uv_sphere_add(radius=RADIUS, segments=64, ring_count=32, location=(-2.0, 8.0, 0.3))
ball = bpy.context.object
ball.name = 'Ball'
bpy.ops.object.shade_smooth()
mat = bpy.data.materials.new('Glow')
mat.use_nodes = True
nodes = mat.node_tree.nodes
for n in list(nodes):
    nodes.remove(n)
emit = nodes.new('ShaderNodeEmission')
emit.inputs['Color'].default_value = (1.0, 0.7, 0.4, 1.0)
emit.inputs['Strength'].default_value = 20.0
outn = nodes.new('ShaderNodeOutputMaterial')
mat.node_tree.links.new(emit.outputs['Emission'], outn.inputs['Surface'])
ball.data.materials.append(mat)
for frame, x in [(FIRST, -2.0), (LAST, 2.0)]:
    ball.location.x = x
    ball.keyframe_insert('location', index=0, frame=frame)
for fc in ball.animation_data.action.fcurves:
    for k in fc.keyframe_points:
        k.interpolation = 'LINEAR'

# a post halfway to the ball, wider than the ball looks: it hides it for a few frames
bpy.ops.mesh.primitive_cube_add(size=1.0, location=(0.1, 4.0, 0.0), scale=(0.6, 0.1, 6.0))
post = bpy.context.object
post.name = 'Post'
black = bpy.data.materials.new('Black')
black.diffuse_color = (0.0, 0.0, 0.0, 1.0)
post.data.materials.append(black)

frames = []
for frame in range(FIRST, LAST + 1):
    scene.frame_set(frame)
    p = ball.matrix_world.translation
    v = world_to_camera_view(scene, cam, p)
    c = cam.matrix_world.inverted() @ p
    # the ball's silhouette, seen from the camera, is a circle of angular radius asin(R / d)
    d = c.length
    f_px = cam_data.lens / cam_data.sensor_width * W
    frames.append({'frame': frame, 'x': v.x * W, 'y': (1.0 - v.y) * H, 'radius': f_px * math.tan(math.asin(RADIUS / d)) * d / -c.z})

scene.render.engine = 'CYCLES'
scene.cycles.device = 'CPU'
scene.cycles.samples = 16
scene.cycles.use_denoising = False
scene.render.image_settings.file_format = 'OPEN_EXR'
scene.render.image_settings.color_depth = '32'
scene.render.image_settings.color_mode = 'RGB'
scene.render.filepath = os.path.join(out, 'plate.####')
bpy.ops.render.render(animation=True)
post.hide_render = True
scene.render.filepath = os.path.join(out, 'clear.####')
bpy.ops.render.render(animation=True)

with open(os.path.join(out, 'reference.json'), 'w') as f:
    json.dump({'width': W, 'height': H, 'first': FIRST, 'last': LAST, 'frames': frames}, f, indent=1)
