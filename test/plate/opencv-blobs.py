# The independent reference for finding lights in a plate: OpenCV (Debian python3-opencv).
# For each 16-bit linear PNG given, the luminance (Rec.709 weights) thresholded at T, its
# 8-connected components (cv2.connectedComponentsWithStats) and, per component, the centroid of
# the luminance over the component's pixels (cv2.moments of the masked image), in straylight's
# pixel-centre convention (+0.5). Prints JSON: [{file, blobs: [{area, x, y}]}].
#
# Run: /usr/bin/python3 opencv-blobs.py T FILE...

import json
import sys

import cv2
import numpy as np

t = float(sys.argv[1])
out = []
for f in sys.argv[2:]:
    bgr = cv2.imread(f, cv2.IMREAD_UNCHANGED).astype(np.float64) / 65535.0
    y = 0.2126 * bgr[:, :, 2] + 0.7152 * bgr[:, :, 1] + 0.0722 * bgr[:, :, 0]
    mask = (y >= t).astype(np.uint8)
    n, labels, stats, _ = cv2.connectedComponentsWithStats(mask, connectivity=8)
    blobs = []
    for k in range(1, n):
        m = cv2.moments(np.where(labels == k, y, 0.0).astype(np.float64), binaryImage=False)
        blobs.append({'area': int(stats[k, cv2.CC_STAT_AREA]), 'x': m['m10'] / m['m00'] + 0.5, 'y': m['m01'] / m['m00'] + 0.5})
    out.append({'file': f, 'blobs': blobs})
print(json.dumps(out))
