# The independent reference for scene import: Blender builds a small animated scene (an invented
# one: a camera pans past a lamp on a wall, a free lamp with a post passing in front of it, and a
# low sun), exports it as glTF binary with Blender's own exporter, reports where Blender projects
# each light at every frame (bpy_extras.object_utils.world_to_camera_view), and renders a
# multilayer OpenEXR with Cycles' depth pass (ViewLayer.Depth.Z) for each frame.
#
# Run: blender -b --factory-startup --python blender-reference.py -- OUT_DIR
# Writes OUT_DIR/scene.glb, OUT_DIR/reference.json, OUT_DIR/depth.####.exr

import json
import math
import os
import sys

import bpy
from bpy_extras.object_utils import world_to_camera_view
from mathutils import Vector

out = sys.argv[sys.argv.index('--') + 1]
os.makedirs(out, exist_ok=True)
W, H = 320, 180
FIRST, LAST = 1, 24

bpy.ops.wm.read_factory_settings(use_empty=True)
scene = bpy.context.scene
scene.render.resolution_x = W
scene.render.resolution_y = H
scene.render.resolution_percentage = 100
scene.render.fps = 24
scene.frame_start = FIRST
scene.frame_end = LAST

# the camera: 35 mm on a 36 mm wide sensor fitted horizontally, panning and dollying
cam_data = bpy.data.cameras.new('ShotCam')
cam_data.lens = 35.0
cam_data.sensor_width = 36.0
cam_data.sensor_fit = 'HORIZONTAL'
cam_data.clip_start = 0.1
cam_data.clip_end = 1000.0
cam = bpy.data.objects.new('ShotCam', cam_data)
scene.collection.objects.link(cam)
scene.camera = cam
cam.rotation_mode = 'XYZ'
for frame, loc, rot in [
    (1, (-2.0, -10.0, 1.6), (88.0, 0.0, -12.0)),
    (12, (0.0, -9.0, 1.8), (90.0, 2.0, 0.0)),
    (24, (2.5, -8.0, 1.7), (92.0, -3.0, 14.0)),
]:
    cam.location = loc
    cam.rotation_euler = [math.radians(a) for a in rot]
    cam.keyframe_insert('location', frame=frame)
    cam.keyframe_insert('rotation_euler', frame=frame)

# a wall far off the axis, with a lamp fixed on its face (its depth is the wall's)
bpy.ops.mesh.primitive_plane_add(size=30.0, location=(0.0, 12.0, 3.0), rotation=(math.radians(90), 0, 0))
bpy.context.object.name = 'Wall'
wall_lamp_pos = (-4.0, 12.0, 3.5)

def point_light(name, pos, watts, colour):
    data = bpy.data.lights.new(name, 'POINT')
    data.energy = watts
    data.color = colour
    data.shadow_soft_size = 0.05
    obj = bpy.data.objects.new(name, data)
    obj.location = pos
    scene.collection.objects.link(obj)
    return obj

wall_lamp = point_light('WallLamp', wall_lamp_pos, 200.0, (1.0, 0.8, 0.6))
free_lamp = point_light('FreeLamp', (1.2, 2.0, 2.2), 500.0, (0.7, 0.85, 1.0))

# a post that slides across in front of the free lamp
bpy.ops.mesh.primitive_cylinder_add(radius=0.25, depth=6.0, location=(0.0, -2.0, 2.0))
post = bpy.context.object
post.name = 'Post'
for frame, x in [(1, -0.6), (24, 2.6)]:
    post.location.x = x
    post.keyframe_insert('location', index=0, frame=frame)

# the sun, low in front of the camera and to the left
sun_data = bpy.data.lights.new('Sun', 'SUN')
sun_data.energy = 3.0
sun = bpy.data.objects.new('Sun', sun_data)
sun.rotation_euler = (math.radians(-80.0), 0.0, math.radians(20.0))
scene.collection.objects.link(sun)

bpy.context.view_layer.update()
bpy.ops.export_scene.gltf(filepath=os.path.join(out, 'scene.glb'), export_format='GLB', export_cameras=True, export_lights=True, export_animations=True, export_yup=True)

frames = []
for frame in range(FIRST, LAST + 1):
    scene.frame_set(frame)
    cam_world = cam.matrix_world
    to_cam = cam_world.inverted()
    row = {'frame': frame, 'lights': {}}
    for obj in (wall_lamp, free_lamp):
        p = obj.matrix_world.translation
        v = world_to_camera_view(scene, cam, p)
        c = to_cam @ p
        row['lights'][obj.name] = {'x': v.x * W, 'y': (1.0 - v.y) * H, 'planar': -c.z, 'distance': (p - cam_world.translation).length}
    # the sun at infinity: a point far along the direction towards it (its +Z axis)
    towards = (sun.matrix_world.to_3x3() @ Vector((0.0, 0.0, 1.0))).normalized()
    v = world_to_camera_view(scene, cam, cam_world.translation + towards * 1.0e7)
    row['lights']['Sun'] = {'x': v.x * W, 'y': (1.0 - v.y) * H}
    frames.append(row)

# Cycles on the CPU, one sample, no denoising, no pixel filter: each pixel's depth is one ray's
scene.render.engine = 'CYCLES'
scene.cycles.device = 'CPU'
scene.cycles.samples = 1
scene.cycles.use_denoising = False
scene.cycles.filter_width = 0.01
scene.cycles.pixel_filter_type = 'BOX'
scene.render.film_transparent = True
bpy.context.view_layer.use_pass_z = True
scene.render.image_settings.file_format = 'OPEN_EXR_MULTILAYER'
scene.render.image_settings.color_depth = '32'
scene.render.filepath = os.path.join(out, 'depth.####')
bpy.ops.render.render(animation=True)

with open(os.path.join(out, 'reference.json'), 'w') as f:
    json.dump({'width': W, 'height': H, 'fps': 24, 'first': FIRST, 'last': LAST, 'frames': frames}, f, indent=1)
